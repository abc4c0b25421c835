#include "sim/events.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace plateau::sim {

std::vector<Dose> expand_doses(const regimen::Regimen& r) {
    std::vector<Dose> out;
    long total = 0;
    for (const auto& d : r.doses) total += d.count;
    if (total > regimen::kMaxDoses) throw std::length_error("too many doses");
    out.reserve(static_cast<std::size_t>(total));
    for (std::size_t e = 0; e < r.doses.size(); ++e) {
        const auto& d = r.doses[e];
        for (long k = 0; k < d.count; ++k)
            out.push_back(Dose{d.at + static_cast<double>(k) * d.every, d.route_index, d.amount, d.over,
                               static_cast<int>(e)});
    }
    std::stable_sort(out.begin(), out.end(), [](const Dose& a, const Dose& b) { return a.time < b.time; });
    return out;
}

namespace {
struct Raw {
    double time;
    int compartment;
    double bolus;
    double rate;
    bool computed;  // an infusion's end, start + duration: carries round-off the dose times do not
};
}  // namespace

std::vector<Event> build_events(const model::Model& m, std::span<const double> params, std::span<const Dose> doses) {
    const std::vector<double> pv(params.begin(), params.end());
    std::vector<Raw> raw;
    raw.reserve(doses.size() * 2);
    for (const auto& d : doses) {
        if (d.route < 0 || static_cast<std::size_t>(d.route) >= m.routes.size())
            throw std::invalid_argument("dose with an unknown route");
        const auto& route = m.routes[static_cast<std::size_t>(d.route)];
        const double f = route.fraction ? model::evaluate_constant(m, *route.fraction, pv) : 1.0;
        const double lag = route.lag ? model::evaluate_constant(m, *route.lag, pv) : 0.0;
        const double t = d.time + lag;
        if (d.duration > 0.0) {
            const double rate = f * d.amount / d.duration;
            raw.push_back({t, route.into, 0.0, rate, lag != 0.0});
            raw.push_back({t + d.duration, route.into, 0.0, -rate, true});
        } else {
            raw.push_back({t, route.into, f * d.amount, 0.0, lag != 0.0});
        }
    }
    std::stable_sort(raw.begin(), raw.end(), [](const Raw& a, const Raw& b) { return a.time < b.time; });
    const std::size_t nc = m.compartments.size();
    std::vector<Event> events;
    std::vector<bool> exact;  // the event's time is a dose time as written, not a computed one
    for (const auto& r : raw) {
        if (events.empty() || r.time - events.back().time > 1e-9 * std::max(1.0, std::abs(r.time))) {
            events.push_back(Event{r.time, std::vector<double>(nc, 0.0), std::vector<double>(nc, 0.0)});
            exact.push_back(!r.computed);
        } else if (!r.computed && !exact.back()) {
            // An infusion ending at 0.7999999999999999 and a dose at 0.8 are one event, at the dose's time, so
            // that the dose time is a step boundary and the value just before it is the left limit there.
            events.back().time = r.time;
            exact.back() = true;
        }
        auto& ev = events.back();
        ev.bolus[static_cast<std::size_t>(r.compartment)] += r.bolus;
        ev.rate_change[static_cast<std::size_t>(r.compartment)] += r.rate;
    }
    return events;
}

}  // namespace plateau::sim
