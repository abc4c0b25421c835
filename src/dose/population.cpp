#include "dose/population.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <thread>

#include "population/distribute.hpp"
#include "population/reduce.hpp"
#include "population/run.hpp"
#include "report/format.hpp"

namespace plateau::dose {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// A patient travels between processes as three doubles per shape: status, need, cap.
constexpr std::size_t kWidth = 3;

// Sorted limits of the patients who can meet every target: PTA(D) counts need ≤ D minus cap < D.
struct Counter {
    std::vector<double> needs, caps;
    std::size_t total = 0;
    explicit Counter(const std::vector<Patient>& ps) : total(ps.size()) {
        for (const Patient& p : ps)
            if (p.status == PatientStatus::Meets) needs.push_back(p.need), caps.push_back(p.cap);
        std::sort(needs.begin(), needs.end());
        std::sort(caps.begin(), caps.end());
    }
    std::size_t at(double d) const {
        const auto up = static_cast<std::size_t>(std::upper_bound(needs.begin(), needs.end(), d) - needs.begin());
        const auto gone = static_cast<std::size_t>(std::lower_bound(caps.begin(), caps.end(), d) - caps.begin());
        return up - gone;
    }
    PtaPoint point(double d) const {
        PtaPoint p;
        p.dose = d;
        p.attained = at(d);
        p.total = total;
        p.pta = total ? static_cast<double>(p.attained) / static_cast<double>(total) : 0.0;
        p.ci95 = population::wilson95(p.attained, total);
        return p;
    }
};

Patient patient_of(const Limits& l) {
    Patient p;
    switch (l.outcome) {
        case Outcome::Meets:
            p.status = PatientStatus::Meets;
            p.need = l.need;
            p.cap = l.cap;
            break;
        case Outcome::NonMonotone:
            p.status = PatientStatus::NotMonotone;
            break;
        default:
            p.status = l.no_steady_state ? PatientStatus::NoSteadyState : PatientStatus::NoDose;
    }
    return p;
}

}  // namespace

std::size_t attaining(const std::vector<Patient>& ps, double dose) { return Counter(ps).at(dose); }

PopulationDose population_dose(const Shape& s, const std::vector<Patient>& ps, double share, double step) {
    PopulationDose out;
    out.shape = s;
    for (const Patient& p : ps) {
        out.no_dose += p.status == PatientStatus::NoDose;
        out.no_steady_state += p.status == PatientStatus::NoSteadyState;
        out.not_monotone += p.status == PatientStatus::NotMonotone;
        out.failed += p.status == PatientStatus::Failed;
    }
    const Counter c(ps);
    out.median = population::percentile(c.needs, 50.0);
    // PTA ≥ share ⇔ attained ≥ share·N; a share written as 90 % of 1000 patients needs 900 of them.
    const double want = share * static_cast<double>(ps.size()) * (1.0 - 1e-12);
    // PTA only rises at some need_i, so the smallest dose reaching the share is one of them (in order).
    std::optional<double> first;
    PtaPoint best;
    for (double d : c.needs) {
        const PtaPoint p = c.point(d);
        if (p.attained > best.attained || best.total == 0) best = p;
        if (static_cast<double>(p.attained) < want) continue;
        if (!first) first = d;
        if (!(step > 0.0)) break;
        // The smallest multiple of the step at or above d; when the PTA has fallen again by then (an upper goal
        // took patients out), a later need_i starts the next stretch at or above the share.
        double m = std::ceil(d / step);
        if (m * step < d) m += 1.0;
        const PtaPoint r = c.point(m * step);
        if (static_cast<double>(r.attained) < want) continue;
        out.found = true;
        out.exact = *first;
        out.at = r;
        if (m > 1.0) out.step_down = c.point((m - 1.0) * step);
        return out;
    }
    if (first && !(step > 0.0)) {
        out.found = true;
        out.exact = *first;
        out.at = c.point(*first);
        return out;
    }
    out.at = best.total ? best : c.point(0.0);
    out.exact = out.at.dose;
    return out;
}

std::vector<std::vector<Patient>> patients(const Template& t, const std::vector<Goal>& goals, const Request& q,
                                           const PopulationRequest& p, const Measure& m) {
    const std::size_t shapes = q.shapes.size(), n = p.size, width = kWidth * shapes;
    const population::Drawer drawer(t.regimen.model, p.cohort, p.seed);
    const std::vector<double> base = t.regimen.parameter_values();

    // One patient under every shape: its own values (and per-kg amounts) in a copy of the template.
    auto one = [&](std::size_t i, double* row) {
        population::Subject sub;
        drawer.draw(i, sub);
        regimen::BodySize body;
        Template ti = t;
        ti.regimen.subject_values = drawer.values(t.regimen, base, sub, body);
        for (std::size_t d = 0; d < ti.regimen.doses.size(); ++d)
            ti.regimen.doses[d].amount = regimen::resolved_amount(t.regimen.doses[d], body);
        for (std::size_t s = 0; s < shapes; ++s) {
            Patient pt;
            try {
                pt = patient_of(limits(ti, goals, q.shapes[s], m));
            } catch (const std::exception&) {
                pt = Patient{};  // a numerical failure of this patient: counted, never an abort
            }
            row[kWidth * s] = static_cast<double>(pt.status);
            row[kWidth * s + 1] = pt.need;
            row[kWidth * s + 2] = pt.cap;
        }
    };
    // This process's share over its threads; each patient writes only its own row, so the rows do not depend on
    // the thread count.
    auto work = [&](std::size_t first, std::size_t stride, std::vector<double>& rows) {
        const std::size_t share = first < n ? (n - first + stride - 1) / stride : 0;
        std::atomic<std::size_t> next{0};
        std::exception_ptr error;
        std::mutex error_mutex;
        auto body = [&] {
            try {
                for (std::size_t j; (j = next.fetch_add(1)) < share;) {
                    const std::size_t i = first + j * stride;
                    one(i, rows.data() + i * width);
                }
            } catch (...) {
                std::lock_guard<std::mutex> lock(error_mutex);
                if (!error) error = std::current_exception();
                next.store(share);
            }
        };
        const int threads = std::max(1, std::min<int>(p.threads, static_cast<int>(std::max<std::size_t>(share, 1))));
        std::vector<std::thread> pool;
        for (int k = 1; k < threads; ++k) pool.emplace_back(body);
        body();
        for (auto& th : pool) th.join();
        if (error) std::rethrow_exception(error);
    };
    const std::vector<double> rows = population::rows_shared(n, width, work);

    std::vector<std::vector<Patient>> out(shapes, std::vector<Patient>(n));
    for (std::size_t i = 0; i < n; ++i)
        for (std::size_t s = 0; s < shapes; ++s) {
            const double* r = rows.data() + i * width + kWidth * s;
            out[s][i] = {static_cast<PatientStatus>(static_cast<int>(r[0])), r[1], r[2]};
        }
    return out;
}

int rank(std::vector<PopulationDose>& ds) {
    std::stable_sort(ds.begin(), ds.end(), [](const PopulationDose& a, const PopulationDose& b) {
        if (a.found != b.found) return a.found;
        if (a.found) return a.daily() < b.daily();
        return a.at.pta > b.at.pta;
    });
    return !ds.empty() && ds.front().found ? 0 : -1;
}

std::string population_rule(double share) {
    return "smallest daily dose whose PTA reaches " + report::percent(share);
}

}  // namespace plateau::dose
