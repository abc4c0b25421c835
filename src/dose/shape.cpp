#include "dose/shape.hpp"

#include <algorithm>
#include <cmath>

namespace plateau::dose {

Template make_template(regimen::Regimen r) {
    std::vector<std::size_t> series;
    for (std::size_t i = 0; i < r.doses.size(); ++i)
        if (r.doses[i].count > 1) series.push_back(i);
    DiagnosticSink sink;
    if (series.size() == 1) {
        const regimen::DoseSpec& d = r.doses[series.front()];
        if (d.offsets.size() > 1)
            sink.error(d.pos, "the maintenance series gives several clock times per repetition",
                       "one dose every interval ('every' without 'times'): the search varies that interval");
        sink.throw_if_any();
        return Template{std::move(r), series.front()};
    }
    if (series.empty()) {
        sink.error(SourcePos{r.path, 0, 0}, "no repeating dose series to vary",
                   "one [[doses]] entry with 'every' and 'count' (or 'until'): the maintenance series");
    } else {
        for (std::size_t i : series)
            sink.error(r.doses[i].pos, "one of " + std::to_string(series.size()) + " repeating dose series",
                       "exactly one [[doses]] entry with 'every': the maintenance series the search varies");
    }
    sink.throw_if_any();
    return {};  // not reached
}

regimen::Regimen variant(const Template& t, const Shape& s, double amount, std::optional<double> loading, bool brief) {
    regimen::Regimen r = t.regimen;
    const regimen::DoseSpec old = r.doses[t.series];
    regimen::DoseSpec d = old;
    d.amount = amount;
    d.per_size = regimen::Per::None;  // the search finds a fixed amount in mg
    d.per_amount = 0.0;
    d.every = s.tau;
    d.over = s.over;
    d.at = old.first_time();
    d.offsets = {0.0};
    d.deviations.clear();  // the search is about the regimen as prescribed
    // The same span of time as the template's series, at least two doses (a steady state needs a repeat).
    const double span = static_cast<double>(old.count) * old.every;
    d.count = brief ? 2L : std::max(2L, static_cast<long>(std::ceil(span / s.tau - 1e-9)));
    if (loading) {
        regimen::DoseSpec first = d;
        first.amount = *loading;  // fixed mg, like the maintenance dose
        first.count = 1;
        first.every = 0.0;
        d.at += s.tau;
        d.count = std::max(2L, d.count - 1);
        r.doses = {first, d};
    } else {
        r.doses[t.series] = d;
    }
    const double series_end = d.at + static_cast<double>(d.count) * d.every;
    r.horizon.until = brief ? series_end : std::max(r.horizon.until, series_end);
    return r;
}

}  // namespace plateau::dose
