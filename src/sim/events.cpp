#include "sim/events.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "regimen/time.hpp"

namespace plateau::sim {

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
        // An infusion shorter than the time resolution would start and stop at one instant and vanish: it
        // is given as a bolus instead (the loader says so).
        if (d.duration > 0.0 && regimen::before(t, t + d.duration)) {
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
        if (events.empty() || regimen::before(events.back().time, r.time)) {
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
