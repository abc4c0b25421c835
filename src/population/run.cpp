#include "population/run.hpp"

#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <stdexcept>
#include <thread>

#include "metrics/exposure.hpp"
#include "metrics/level.hpp"
#include "population/draw.hpp"
#include "verdict/verdicts.hpp"
#include "taylor/stepper.hpp"

namespace plateau::population {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The highest threshold met when a share `need` of each steady-state interval must be above it.
double attained_level(const metrics::Steady& st, int series, double need) {
    if (need >= 1.0) return st.minimum.value;
    const double tau = st.interval;
    double lo = st.minimum.value, hi = st.peak.value;
    for (int k = 0; k < 50 && hi - lo > 1e-9 * hi; ++k) {
        const double mid = 0.5 * (lo + hi);
        if (metrics::level(st.period, series, mid, 0.0, tau).hours_above >= need * tau - 1e-12 * tau) lo = mid;
        else hi = mid;
    }
    return lo;
}

struct Worker {
    const std::vector<regimen::Regimen>& regimens;
    const Setup& setup;
    const Drawer& drawer;
    const std::vector<std::vector<double>>& base;   // per regimen: typical values with the regimen's patient
    const std::vector<metrics::Request>& requests;
    Result& result;

    void subject(std::size_t i, std::vector<regimen::Regimen>& work, std::vector<taylor::Stepper>& steppers) const {
        Subject& sub = result.subjects[i];
        drawer.draw(i, sub);
        for (std::size_t r = 0; r < regimens.size(); ++r) {
            regimen::Regimen& w = work[r];
            regimen::BodySize body;
            std::vector<double> values = drawer.values(regimens[r], base[r], sub, body);
            for (std::size_t d = 0; d < w.doses.size(); ++d)
                w.doses[d].amount = regimen::resolved_amount(regimens[r].doses[d], body);
            w.subject_values = values;
            sub.parameters.push_back(values);
            sub.weight_kg.push_back(body.weight_kg);
            result.figures[r][i] = measure(r, w, steppers[r], i);
        }
    }

    Figures measure(std::size_t r, const regimen::Regimen& w, taylor::Stepper& stepper, std::size_t i) const {
        Figures f;
        const metrics::Request& req = requests[r];
        const int n_targets = static_cast<int>(verdict::verdicts(w.targets, w.model.outputs[static_cast<std::size_t>(req.output)],
                                                                metrics::Exposure{})
                                                   .size());
        f.met.assign(static_cast<std::size_t>(n_targets), -1);
        float* band = result.bands[r].data() + i * static_cast<std::size_t>(setup.band_points);
        auto fail = [&] {
            f.status = Status::Failed;
            f.first_peak = f.ss_peak = f.ss_trough = f.ss_average = f.ss_auc24 = f.above_pct = f.first_reached = f.level = kNaN;
            for (int k = 0; k < setup.band_points; ++k) band[k] = std::numeric_limits<float>::quiet_NaN();
            return f;
        };
        try {
            const std::vector<double>& values = w.subject_values;
            std::vector<sim::Dose> doses = sim::expand_doses(w);
            const std::vector<sim::Event> events = sim::build_events(w.model, values, doses);
            stepper.set_params(values);
            const std::vector<double> x0(w.model.compartments.size(), 0.0);
            sim::Simulation s = sim::integrate_events(w.model, stepper, events, x0, w.horizon.until, setup.options);
            if (s.outcome != taylor::Outcome::Ok) return fail();
            s.doses = std::move(doses);
            const metrics::Exposure e = metrics::compute(w, s, req);
            const int series = s.output_series(req.output);
            const auto& times = result.band_times[r];
            for (int k = 0; k < setup.band_points; ++k)
                band[k] = static_cast<float>(s.trajectory.value(series, times[static_cast<std::size_t>(k)]));
            f.first_peak = e.intervals.empty() ? e.peak.value : e.intervals.front().peak.value;
            f.first_reached = e.first_reached ? *e.first_reached : kNaN;
            const auto verdicts = verdict::verdicts(w.targets, w.model.outputs[static_cast<std::size_t>(req.output)], e);
            for (std::size_t k = 0; k < verdicts.size(); ++k) f.met[k] = verdicts[k].met ? (*verdicts[k].met ? 1 : 0) : -1;
            if (e.steady && e.steady->found) {
                const metrics::Steady& st = *e.steady;
                f.ss_peak = st.peak.value;
                f.ss_trough = st.trough;
                f.ss_average = st.average;
                f.ss_auc24 = st.auc24;
                f.above_pct = w.targets.above ? 100.0 * st.above_hours / st.interval : kNaN;
                f.level = w.targets.above ? attained_level(st, series, w.targets.above_for.value_or(1.0)) : kNaN;
            } else {
                f.status = Status::NoSteadyState;
                f.ss_peak = f.ss_trough = f.ss_average = f.ss_auc24 = f.above_pct = f.level = kNaN;
            }
            return f;
        } catch (const std::exception&) {
            return fail();
        }
    }
};

}  // namespace

Drawer::Drawer(const model::Model& m, const Cohort* cohort, std::uint64_t seed)
    : model_(&m), cohort_(cohort), seed_(seed) {
    if (cohort != nullptr) {
        names_ = cohort->names();
        for (const auto& n : names_) {
            Slot s;
            s.param = m.parameter_index(n);
            s.weight = n == regimen::kWeightName;
            s.height = n == regimen::kHeightName;
            if (s.param >= 0 && m.parameters[static_cast<std::size_t>(s.param)].kind != model::ParamKind::Covariate)
                throw std::invalid_argument("the cohort gives '" + n + "', which is a parameter of model '" + m.id +
                                            "', not a covariate");
            if (s.param < 0 && !s.weight && !s.height) {
                std::string list;
                for (const auto& p : m.parameters)
                    if (p.kind == model::ParamKind::Covariate) list += (list.empty() ? "" : ", ") + p.name;
                throw std::invalid_argument("the cohort gives '" + n + "', which is not a covariate of model '" + m.id +
                                            "' (its covariates: " + (list.empty() ? "none" : list) + "; also wt, ht for dosing)");
            }
            slots_.push_back(s);
        }
        if (!cohort->correlation.empty()) cov_chol_ = model::cholesky(cohort->correlation, cohort->covariates.size());
    }
    eta_chol_ = model::cholesky(model::omega_matrix(m), m.variability.size());
}

void Drawer::draw(std::size_t i, Subject& sub) const {
    if (cohort_ != nullptr) sub.covariates = draw_covariates(*cohort_, cov_chol_, seed_, i);
    sub.eta = random_effects(seed_, i, eta_chol_, model_->variability.size());
}

std::vector<double> Drawer::values(const regimen::Regimen& r, const std::vector<double>& base, const Subject& sub,
                                   regimen::BodySize& body) const {
    std::vector<double> values = base;
    body = r.body_size();
    for (std::size_t k = 0; k < sub.covariates.size(); ++k) {
        if (slots_[k].param >= 0) values[static_cast<std::size_t>(slots_[k].param)] = sub.covariates[k];
        if (slots_[k].weight) body.weight_kg = sub.covariates[k] / 1e6;
        if (slots_[k].height) body.height_cm = sub.covariates[k];
    }
    model::individualize(*model_, values, sub.eta);
    return values;
}

Result run(const std::vector<regimen::Regimen>& regimens, const Setup& setup) {
    if (regimens.empty()) throw std::invalid_argument("no regimens");
    const model::Model& m = regimens.front().model;
    for (const auto& r : regimens)
        if (r.model.path != m.path || r.model.id != m.id)
            throw std::invalid_argument("regimens '" + regimens.front().id + "' and '" + r.id +
                                        "' use different models ('" + m.id + "', '" + r.model.id +
                                        "'): a population shares one model, so each subject is the same under every regimen");
    Result result;
    const std::size_t n = setup.size;
    result.subjects.resize(n);
    result.figures.assign(regimens.size(), std::vector<Figures>(n));
    result.bands.assign(regimens.size(), std::vector<float>(n * static_cast<std::size_t>(setup.band_points)));
    std::vector<metrics::Request> requests;
    std::vector<std::vector<double>> base;
    const taylor::Tape tape = sim::model_tape(m);   // once per model (the steady-state solve uses it too)
    sim::Options with_tape = setup.options;
    with_tape.tape = &tape;
    for (const auto& r : regimens) {
        requests.push_back(metrics::request_from(r, with_tape));
        base.push_back(r.parameter_values());
        std::vector<double> t(static_cast<std::size_t>(setup.band_points));
        for (std::size_t k = 0; k < t.size(); ++k)
            t[k] = r.horizon.until * static_cast<double>(k) / static_cast<double>(t.size() - 1);
        result.band_times.push_back(std::move(t));
    }
    const Drawer drawer(m, setup.cohort, setup.seed);
    result.covariate_names = drawer.covariate_names();
    Worker worker{regimens, setup, drawer, base, requests, result};

    const std::size_t n_share = setup.first < n ? (n - setup.first + setup.stride - 1) / setup.stride : 0;
    std::atomic<std::size_t> next{0}, done{0};
    std::exception_ptr error;
    std::mutex error_mutex;
    constexpr std::size_t kChunk = 8;
    auto body = [&] {
        try {
            std::vector<regimen::Regimen> work = regimens;   // per thread: the subject's values and amounts go here
            std::vector<taylor::Stepper> steppers;
            for (std::size_t r = 0; r < regimens.size(); ++r)
                steppers.emplace_back(tape, base[r], setup.options.tol, setup.options.order);
            while (true) {
                const std::size_t first = next.fetch_add(kChunk);
                if (first >= n_share) break;
                const std::size_t last = std::min(n_share, first + kChunk);
                for (std::size_t j = first; j < last; ++j) worker.subject(setup.first + j * setup.stride, work, steppers);
                const std::size_t d = done.fetch_add(last - first) + (last - first);
                if (setup.progress) setup.progress(d);
            }
        } catch (...) {
            std::lock_guard<std::mutex> lock(error_mutex);
            if (!error) error = std::current_exception();
            next.store(n_share);
        }
    };
    const int threads = std::max(1, std::min<int>(setup.threads, static_cast<int>((n_share + kChunk - 1) / kChunk)));
    std::vector<std::thread> pool;
    for (int t = 1; t < threads; ++t) pool.emplace_back(body);
    body();
    for (auto& t : pool) t.join();
    if (error) std::rethrow_exception(error);
    return result;
}

}  // namespace plateau::population
