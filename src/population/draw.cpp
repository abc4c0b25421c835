#include "population/draw.hpp"

#include <Random123/philox.h>

#include <boost/math/distributions/normal.hpp>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <cmath>
#include <stdexcept>

namespace plateau::population {

SubjectRng::SubjectRng(std::uint64_t seed, std::uint64_t subject, Stream stream)
    : key_{seed, 0x706c617465617500ULL}, ctr_{subject, static_cast<std::uint64_t>(stream), 0, 0}, out_{0, 0, 0, 0} {}

SubjectRng::result_type SubjectRng::operator()() {
    if (used_ == 4) {
        r123::Philox4x64 gen;
        r123::Philox4x64::ctr_type c = {{ctr_[0], ctr_[1], ctr_[2], ctr_[3]}};
        r123::Philox4x64::key_type k = {{key_[0], key_[1]}};
        const auto r = gen(c, k);
        for (int j = 0; j < 4; ++j) out_[j] = r.v[j];
        ++ctr_[2];
        used_ = 0;
    }
    return out_[used_++];
}

std::vector<double> standard_normals(SubjectRng& rng, std::size_t n) {
    boost::random::normal_distribution<double> nd(0.0, 1.0);
    std::vector<double> z(n);
    for (auto& v : z) v = nd(rng);
    return z;
}

namespace {

std::vector<double> correlate(std::span<const double> chol, const std::vector<double>& z) {
    const std::size_t n = z.size();
    if (chol.empty()) return z;
    std::vector<double> out(n, 0.0);
    for (std::size_t i = 0; i < n; ++i)
        for (std::size_t k = 0; k <= i; ++k) out[i] += chol[i * n + k] * z[k];
    return out;
}

}  // namespace

std::vector<double> random_effects(std::uint64_t seed, std::uint64_t subject, std::span<const double> chol, std::size_t n) {
    if (n == 0) return {};
    SubjectRng rng(seed, subject, Stream::RandomEffects);
    return correlate(chol, standard_normals(rng, n));
}

std::vector<double> draw_covariates(const Cohort& c, std::span<const double> chol, std::uint64_t seed,
                                    std::uint64_t subject) {
    SubjectRng rng(seed, subject, Stream::Covariates);
    if (!c.rows.empty()) {
        boost::random::uniform_int_distribution<std::size_t> pick(0, c.rows.size() - 1);
        return c.rows[pick(rng)];
    }
    const std::size_t n = c.covariates.size();
    static const boost::math::normal_distribution<double> unit;
    for (int attempt = 0; attempt < 10000; ++attempt) {
        const std::vector<double> z = correlate(chol, standard_normals(rng, n));
        std::vector<double> x(n);
        bool inside = true;
        for (std::size_t i = 0; i < n && inside; ++i) {
            const CovariateDist& d = c.covariates[i];
            switch (d.dist) {
            case Dist::Normal: x[i] = d.mean + d.sd * z[i]; break;
            case Dist::LogNormal: x[i] = d.mean * std::exp(d.sd * z[i]); break;
            case Dist::Uniform:
                // Through the normal CDF (a Gaussian copula), so a uniform covariate can be correlated too.
                x[i] = d.low + (d.high - d.low) * boost::math::cdf(unit, z[i]);
                break;
            }
            inside = x[i] >= d.low && x[i] <= d.high;
        }
        if (inside) return x;
    }
    throw std::runtime_error("cohort '" + c.id + "': 10000 draws in a row fell outside the covariate ranges");
}

}  // namespace plateau::population
