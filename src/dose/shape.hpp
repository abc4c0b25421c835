// The template regimen of a dose search and its variants: the template's one repeating [[doses]] series is the
// maintenance series; a variant sets its amount, interval and infusion length (and optionally puts a loading
// dose first), keeping the model, route, parameters, targets and the span of time the series covers.
#pragma once

#include <cstddef>
#include <optional>

#include "regimen/regimen.hpp"

namespace plateau::dose {

struct Template {
    regimen::Regimen regimen;  // as loaded, with the command line's targets applied
    std::size_t series = 0;    // index of the repeating [[doses]] entry
};

// Finds the maintenance series. Throws InputError (at the file, or at each series) when the file has no
// repeating series, more than one, or one given as several clock times a day.
Template make_template(regimen::Regimen r);

// One candidate shape: a dose every `tau` hours, each given over `over` hours (0: bolus).
struct Shape {
    double tau = 0.0;
    double over = 0.0;
};

// The template with the maintenance series set to `amount` (mg) every tau over `over`, as prescribed (the
// template's missed, late or doubled doses are left out). With a loading dose the
// series' first dose becomes `loading` (mg, same route and infusion length) and the template's single doses are
// left out, so the first interval is the loading dose's alone.
// `brief`: only two doses of the series and a horizon ending with them — the steady-state figures do not depend
// on the horizon, so the search measures these, and only the reported dose over the template's span.
regimen::Regimen variant(const Template& t, const Shape& s, double amount, std::optional<double> loading = {},
                         bool brief = false);

}  // namespace plateau::dose
