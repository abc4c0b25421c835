// Subject i's random numbers: a counter-based generator (Random123's Philox 4×64) keyed on (seed, i), so a
// subject's draws do not depend on how many threads run or on which thread draws it; Boost.Random's
// distributions turn them into normal deviates identically on every platform (the standard library's do not).
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "model/model.hpp"
#include "population/cohort.hpp"

namespace plateau::population {

// Independent streams of one subject.
enum class Stream : std::uint64_t { Covariates = 1, RandomEffects = 2 };

// A uniform random bit generator over Philox4x64 for one (seed, subject, stream).
class SubjectRng {
public:
    using result_type = std::uint64_t;
    SubjectRng(std::uint64_t seed, std::uint64_t subject, Stream stream);
    static constexpr result_type min() { return 0; }
    static constexpr result_type max() { return ~result_type{0}; }
    result_type operator()();

private:
    std::uint64_t key_[2];
    std::uint64_t ctr_[4];
    std::uint64_t out_[4];
    int used_ = 4;
};

// `n` independent standard normal deviates.
std::vector<double> standard_normals(SubjectRng& rng, std::size_t n);

// The random effects η = L·z of a subject (L: Cholesky factor of Ω, n×n).
std::vector<double> random_effects(std::uint64_t seed, std::uint64_t subject, std::span<const double> chol, std::size_t n);

// A subject's covariate values from the cohort, in Cohort::names() order. `chol`: Cholesky factor of the
// cohort's correlation (empty: independent). Truncation by redrawing the whole vector; throws
// std::runtime_error if 10 000 draws all fall outside the ranges.
std::vector<double> draw_covariates(const Cohort& c, std::span<const double> chol, std::uint64_t seed,
                                    std::uint64_t subject);

}  // namespace plateau::population
