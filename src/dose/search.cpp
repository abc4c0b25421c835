#include "dose/search.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "report/format.hpp"

namespace plateau::dose {

namespace {

std::string mg(double d) {
    return report::num(d, 6) + " mg";
}

const model::Output& output_of(const regimen::Regimen& r) {
    const int i = r.targets.output.empty() ? 0 : std::max(0, r.model.output_index(r.targets.output));
    return r.model.outputs[static_cast<std::size_t>(i)];
}

bool all_met(const std::vector<verdict::Verdict>& vs) {
    return std::all_of(vs.begin(), vs.end(), [](const verdict::Verdict& v) { return v.met == true; });
}

// One candidate shape. Figures are cached per dose: one simulation answers every goal.
class ShapeSearch {
public:
    ShapeSearch(const Template& t, const std::vector<Goal>& goals, const Request& q, const Measure& m, Shape s)
        : t_(t), goals_(goals), q_(q), m_(m), s_(s) {}

    Found run() {
        Found f;
        f.shape = s_;
        const double start = start_dose();
        if (!has_steady_state(start, f)) return f;
        const Span sp = span(start);
        if (sp.outcome == Outcome::NonMonotone || sp.outcome == Outcome::Unreachable) {
            f.outcome = sp.outcome;
            f.message = sp.message;
            return measured(f, start, start);
        }
        const double need = sp.need, cap = sp.cap;
        const std::optional<double> exact = sp.exact;
        const std::string &need_label = sp.need_label, &cap_label = sp.cap_label, &need_name = sp.need_name,
                          &cap_name = sp.cap_name, &exact_label = sp.exact_label;
        if (exact) f.deciding = sp.exact_name;
        double dose = 0.0;
        bool nearest = false;
        if (exact) {
            dose = *exact;
            nearest = true;
        } else if (need <= cap) {
            dose = need;
            f.deciding = need_name;
        } else {
            f.outcome = Outcome::Infeasible;
            f.deciding = need_name + " vs " + cap_name;
            dose = cap > 0.0 ? std::sqrt(need * cap) : need;
            nearest = true;
            f.message = "no dose meets every target: " + need_label + " needs at least " + mg(need) + " but " +
                        cap_label + " allows at most " + mg(cap);
            if (cap_label.rfind("window", 0) == 0 && need_label.rfind("window", 0) != 0)
                f.message += " (the peak leaves the window before the threshold is met)";
            else if (cap_label.rfind("window", 0) == 0)
                f.message += " (the peak leaves the window before the lowest value enters it)";
            f.message += "; figures at the best compromise, " + mg(dose) + ", halfway between the two on a log scale";
        }
        measured(f, dose, round(dose, nearest));
        if (exact && q_.round_step > 0.0)
            // A value asked exactly is hit at the solved dose; the preparable dose is the nearest step to it.
            for (auto& v : f.verdicts)
                if (v.kind == "auc24") {
                    v.met = true;
                    v.what += " (hit at " + mg(f.exact) + "; " + mg(f.dose) + " is the nearest " + mg(q_.round_step) +
                              " step)";
                }
        if (exact) {
            const Goal& g =
                *std::find_if(goals_.begin(), goals_.end(), [](const Goal& x) { return x.side == Side::Exact; });
            f.miss = std::abs(figure_of(g, f.at->exposure) - g.value) / g.value;
        }
        if (f.outcome != Outcome::Infeasible) {
            f.outcome = all_met(f.verdicts) ? Outcome::Meets : Outcome::FallsShort;
            std::vector<std::string> missed;
            for (const auto& v : f.verdicts)
                if (v.met != true) missed.push_back(v.what);
            std::string list;
            for (std::size_t i = 0; i < missed.size(); ++i) list += (i ? "; " : "") + missed[i];
            if (f.outcome == Outcome::FallsShort)
                f.message = exact ? "the dose for " + exact_label + " misses: " + list
                                  : "rounding up to " + mg(f.dose) + " misses: " + list;
        }
        if (q_.loading && f.outcome != Outcome::Infeasible) f.loading = loading(f);
        return f;
    }

    // The doses between which every target is met (need ≤ dose ≤ cap), or why there are none. No dose is
    // measured over the template's span: this is all the population search asks of each virtual patient.
    Limits limits() {
        Limits l;
        Found f;
        const double start = start_dose();
        if (!has_steady_state(start, f)) {
            l.outcome = Outcome::Unreachable;
            l.no_steady_state = true;
            return l;
        }
        const Span sp = span(start);
        l.outcome = sp.outcome;
        if (l.outcome != Outcome::Meets) return l;
        l.need = sp.need;
        l.cap = sp.cap;
        if (!(sp.need <= sp.cap)) l.outcome = Outcome::Infeasible;
        return l;
    }

private:
    struct Span {
        Outcome outcome = Outcome::Meets;  // or NonMonotone, Unreachable (with the message)
        std::string message;
        double need = 0.0, cap = std::numeric_limits<double>::infinity();
        std::string need_label, cap_label, need_name, cap_name;
        std::optional<double> exact;
        std::string exact_label, exact_name;
    };

    double start_dose() const {
        const regimen::DoseSpec& spec = t_.regimen.doses[t_.series];
        return spec.amount * s_.tau / spec.every;  // the template's daily dose
    }

    // Each goal solved on its own: the largest lower-goal dose, the smallest upper-goal limit, the exact dose.
    Span span(double start) {
        Span sp;
        for (std::size_t gi = 0; gi < goals_.size(); ++gi) {
            const Goal& g = goals_[gi];
            Root r = solve_rising([&](double d) { return figures(d)[gi]; }, g.value, start);
            if (r.status == RootStatus::NonMonotone) {
                sp.outcome = Outcome::NonMonotone;
                sp.message = "the search cannot be trusted for " + g.label + ": " + r.why +
                             " (a dose search needs figures that rise with the dose)";
                return sp;
            }
            const bool reached_at_zero = r.low == 0.0 && std::isfinite(r.high);
            if (g.side != Side::Upper && r.status == RootStatus::Unreachable && !reached_at_zero) {
                sp.outcome = Outcome::Unreachable;
                sp.message = "no dose reaches " + g.label + ": " + r.why;
                return sp;
            }
            if (g.side == Side::Lower && r.high > sp.need)
                sp.need = r.high, sp.need_label = g.label, sp.need_name = g.name;
            if (g.side == Side::Exact) sp.exact = r.high, sp.exact_label = g.label, sp.exact_name = g.name;
            // An upper goal never reached (even at the largest dose searched) sets no limit.
            if (g.side == Side::Upper && std::isfinite(r.high) && r.low < sp.cap)
                sp.cap = r.low, sp.cap_label = g.label, sp.cap_name = g.name;
        }
        return sp;
    }

    const Template& t_;
    const std::vector<Goal>& goals_;
    const Request& q_;
    const Measure& m_;
    Shape s_;
    std::map<double, std::vector<double>> cache_;

    const std::vector<double>& figures(double d) {
        auto it = cache_.find(d);
        if (it != cache_.end()) return it->second;
        const report::Candidate c = m_(variant(t_, s_, d, {}, true));
        std::vector<double> v;
        for (const Goal& g : goals_) v.push_back(figure_of(g, c.exposure));
        return cache_.emplace(d, std::move(v)).first->second;
    }

    double round(double d, bool nearest) const {
        const double step = q_.round_step;
        if (!(step > 0.0)) return d;
        return nearest ? std::max(step, std::round(d / step) * step) : std::ceil(d / step) * step;
    }

    // A steady state at the template's daily dose, or at a thousandth of it (saturable elimination loses it
    // only at large doses); otherwise the candidate says why there is none.
    bool has_steady_state(double start, Found& f) {
        for (double d : {start, start * 1e-3}) {
            const report::Candidate c = m_(variant(t_, s_, d, {}, true));
            if (c.exposure.steady && c.exposure.steady->found) {
                f = Found{};
                f.shape = s_;
                return true;
            }
            if (d == start) {
                f.outcome = Outcome::Unreachable;
                f.message = "no steady state: " + (c.exposure.steady ? c.exposure.steady->why_not
                                                                     : std::string("the regimen does not repeat"));
                f.exact = f.dose = start;
                f.at = c;
                f.verdicts = verdict::verdicts(c.regimen.targets, output_of(c.regimen), c.exposure);
            }
        }
        return false;
    }

    Found& measured(Found& f, double exact, double dose) {
        f.exact = exact;
        f.dose = dose;
        f.at = m_(variant(t_, s_, dose));
        f.verdicts = verdict::verdicts(f.at->regimen.targets, output_of(f.at->regimen), f.at->exposure);
        return f;
    }

    // The loading dose bringing the first interval's trough (with a time-above share target: its time above the
    // threshold) to the steady-state value at the maintenance dose.
    Loading loading(const Found& f) {
        Loading l;
        const bool share =
            std::any_of(goals_.begin(), goals_.end(), [](const Goal& g) { return g.figure == Figure::AboveShare; });
        const metrics::Steady& st = *f.at->exposure.steady;
        l.figure = share ? "time above (h)" : "trough";
        l.steady_value = share ? st.above_hours : st.trough;
        auto first = [&](double load) {
            const report::Candidate c = m_(variant(t_, s_, f.dose, load, true));
            if (c.exposure.intervals.empty()) return std::numeric_limits<double>::quiet_NaN();
            const metrics::Interval& iv = c.exposure.intervals.front();
            return share ? iv.above_hours : iv.trough;
        };
        const Root r = solve_rising(first, l.steady_value, f.dose);
        if (r.status != RootStatus::Found) {
            l.problem = r.why;
            return l;
        }
        l.exact = r.high;
        l.dose = round(r.high, false);
        l.first_value = first(l.dose);
        return l;
    }
};

}  // namespace

Limits limits(const Template& t, const std::vector<Goal>& goals, const Shape& s, const Measure& m) {
    const Request q;
    return ShapeSearch(t, goals, q, m, s).limits();
}

std::vector<Found> search(const Template& t, const std::vector<Goal>& goals, const Request& q, const Measure& m) {
    std::vector<Found> out;
    for (const Shape& s : q.shapes) out.push_back(ShapeSearch(t, goals, q, m, s).run());
    return out;
}

int rank(std::vector<Found>& fs) {
    std::stable_sort(fs.begin(), fs.end(), [](const Found& a, const Found& b) {
        const bool ma = a.outcome == Outcome::Meets, mb = b.outcome == Outcome::Meets;
        if (ma != mb) return ma;
        // Closest to an exact goal first; differences below the figures' round-off do not count.
        if (std::abs(a.miss - b.miss) > 1e-9) return a.miss < b.miss;
        return a.daily() < b.daily();
    });
    return !fs.empty() && fs.front().outcome == Outcome::Meets ? 0 : -1;
}

std::string rule(const std::vector<Goal>& goals) {
    const bool exact = std::any_of(goals.begin(), goals.end(), [](const Goal& g) { return g.side == Side::Exact; });
    return exact ? "closest to the exact target, then smallest daily dose, meeting every target"
                 : "smallest daily dose meeting every target";
}

std::string outcome_name(Outcome o) {
    switch (o) {
        case Outcome::Meets:
            return "meets every target";
        case Outcome::FallsShort:
            return "falls short";
        case Outcome::Infeasible:
            return "no dose fits";
        case Outcome::NonMonotone:
            return "not monotone";
        case Outcome::Unreachable:
            return "unreachable";
    }
    return "";
}

}  // namespace plateau::dose
