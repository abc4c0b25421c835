// Validation of regimen files: parameter overrides, doses and series, targets, horizon, and the limits.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "input/clock.hpp"
#include "input/load.hpp"
#include "input/loaders.hpp"
#include "regimen/time.hpp"

namespace plateau::input {

namespace detail {

namespace {

using units::kAmountRate;
using units::kMass;
using units::kTime;

const std::vector<std::string> kDoseKeys{"route",   "amount", "at",     "every", "count", "until",  "over",
                                         "rate",    "times",  "days",   "missed", "late", "doubled"};

// Where the values of a [[doses]] entry are written, so that a warning points at the key behind it (the
// entry's header when the key is absent).
struct DoseKeys {
    SourcePos at, every, over;       // `over` or `rate`, whichever gives the infusion length
    std::vector<SourcePos> times;    // the clock times, in the order of spec.offsets
};

struct DoseEntry {
    regimen::DoseSpec spec;
    bool ok = false;
    int number = 0;   // 1-based position among the [[doses]] entries
    DoseKeys keys;
};

// The position of a value as errors give it: inside the quotes for a string.
SourcePos value_pos(const Document& doc, const Value* v, const SourcePos& absent) {
    if (v == nullptr) return absent;
    return v->kind == Kind::String ? string_pos(doc, *v, 0) : v->pos;
}

std::string entry_name(const DoseEntry& d) {
    std::string s = "[[doses]] entry " + std::to_string(d.number);
    if (!d.spec.route.empty()) s += " (route '" + d.spec.route + "')";
    return s;
}

std::string hours(double h) { return fmt(h) + " h"; }

// An optional quantity key of a [[doses]] entry.
struct Field {
    bool present = false;   // the key is there
    bool ok = false;        // ... and its value is good
    double value = 0.0;
    const Value* v = nullptr;
};

Field field(Ctx& c, const Value& t, const char* key, units::Dim dim, const char* example) {
    Field f;
    const Entry* e = t.find(key);
    if (e == nullptr) return f;
    f.present = true;
    f.v = &e->value;
    if (auto q = quantity(c, e->value, key, dim, example)) {
        f.ok = true;
        f.value = q->value;
    }
    return f;
}

// Reports a value that parsed but is out of range.
void require(Ctx& c, Field& f, bool good, const std::string& message, const std::string& expected) {
    if (!f.ok || good) return;
    c.value_error(*f.v, message + ", got '" + f.v->str + "'", expected);
    f.ok = false;
}

// `amount`: a mass ("500 mg"), or a mass per kg of body weight ("15 mg/kg") or per m² of body-surface area
// ("75 mg/m2"), resolved against the patient once the whole file is read.
Field amount_field(Ctx& c, const Value& t, regimen::DoseSpec& spec) {
    const Entry* e = t.find("amount");
    if (e == nullptr || e->value.kind != Kind::String) return field(c, t, "amount", kMass, "250 mg");
    const std::string& text = e->value.str;
    for (const auto& [tail, per] : {std::pair<std::string, regimen::Per>{"/kg", regimen::Per::Kg},
                                    {"/m2", regimen::Per::M2}, {"/m\xC2\xB2", regimen::Per::M2}}) {
        if (text.size() <= tail.size() || text.compare(text.size() - tail.size(), tail.size(), tail) != 0) continue;
        Field f;
        f.present = true;
        f.v = &e->value;
        try {
            f.value = units::parse_quantity(std::string_view(text).substr(0, text.size() - tail.size()), kMass).value;
            f.ok = true;
            spec.per_size = per;
            spec.per_amount = f.value;
        } catch (const TextError&) {
            c.value_error(e->value, "cannot read the amount '" + text + "'",
                          "a mass per body size, like \"15 mg/kg\" or \"75 mg/m2\"");
        }
        return f;
    }
    return field(c, t, "amount", kMass, "250 mg");
}

DoseEntry parse_dose(Ctx& c, const Value& t, int number, const model::Model* m, const std::optional<double>& start_clock,
                     bool start_clock_written) {
    DoseEntry d;
    d.number = number;
    d.spec.pos = t.pos;
    check_keys(c, t, kDoseKeys, "[[doses]]");
    // With a misspelt key, how the series is given cannot be judged: only the misspelling is reported.
    const bool typo = std::find(c.tables_with_unknown_keys.begin(), c.tables_with_unknown_keys.end(), &t) !=
                      c.tables_with_unknown_keys.end();
    bool ok = !typo;

    std::vector<std::string> routes;
    if (m != nullptr)
        for (const auto& r : m->routes) routes.push_back(r.name);
    const std::string route_hint =
        routes.empty() ? "route = \"<route name>\"" : "route = \"" + routes.front() + "\" (" + one_of(routes) + ")";
    if (const Value* route = get_string(c, t, "route", true, "[[doses]]", route_hint)) {
        d.spec.route = route->str;
        if (m != nullptr) {
            d.spec.route_index = m->route_index(route->str);
            if (d.spec.route_index < 0) {
                c.value_error(*route, "unknown route '" + route->str + "'" + did_you_mean(route->str, routes),
                              routes.empty() ? "a route, but the model defines none in [routes]" : one_of(routes));
                ok = false;
            }
        }
    } else {
        ok = false;
    }

    Field amount = amount_field(c, t, d.spec);
    // `at` may be a clock time ("14:00", "day 2 08:00") when the file states the clock time at t = 0.
    Field at;
    const Entry* at_e = t.find("at");
    if (at_e != nullptr && at_e->value.kind == Kind::String && looks_like_clock(at_e->value.str)) {
        at.present = true;
        at.v = &at_e->value;
        if (!start_clock) {
            if (!start_clock_written)
                c.value_error(at_e->value, "'at' is a clock time, but the file does not say the clock time at t = 0",
                              start_clock_hint());
        } else if (auto ct = clock_time(c, at_e->value, "at", true)) {
            at.ok = true;
            at.value = hours_from_start(*ct, *start_clock);
        }
    } else {
        at = field(c, t, "at", kTime, "0 h");
    }
    Field every = field(c, t, "every", kTime, "8 h");
    Field until = field(c, t, "until", kTime, "7 d");
    Field over = field(c, t, "over", kTime, "30 min");
    Field rate = field(c, t, "rate", kAmountRate, "2 g/h");
    if (!amount.present)
        c.missing(t, "amount", "[[doses]]", "amount = \"<mass>\", like \"250 mg\"");
    require(c, amount, amount.value > 0.0, "the amount must be more than 0", "an amount above 0, like \"250 mg\"");
    require(c, at, at.value >= 0.0, "'at' must not be negative", "a time of 0 h or later");
    require(c, every, every.value > 0.0, "'every' must be more than 0", "an interval above 0, like \"8 h\"");
    require(c, over, over.value > 0.0, "'over' must be more than 0",
            "a duration above 0, like \"30 min\" (leave 'over' out for a bolus)");
    require(c, rate, rate.value > 0.0, "'rate' must be more than 0",
            "an amount per time above 0, like \"2 g/h\" (leave 'rate' out for a bolus)");
    if (!amount.ok) ok = false;
    for (const Field* f : {&at, &every, &until, &over, &rate})
        if (f->present && !f->ok) ok = false;

    // count: an integer from 1 to kMaxDoses.
    const Entry* count_e = t.find("count");
    long count = 1;
    if (count_e != nullptr) {
        const Value& v = count_e->value;
        const std::string expected = "a whole number of doses from 1 to " + std::to_string(regimen::kMaxDoses) + ", like 20";
        if (v.kind == Kind::Float) {
            c.error(v.pos, "'count' must be an integer, not a float (" + fmt(v.number) + ")", expected);
            ok = false;
        } else if (v.kind != Kind::Integer) {
            wrong_kind(c, v, "count", "an integer", expected);
            ok = false;
        } else if (v.integer < 1 || v.integer > regimen::kMaxDoses) {
            c.error(v.pos, "'count' is " + std::to_string(v.integer) + ", outside 1 to " + std::to_string(regimen::kMaxDoses),
                    expected);
            ok = false;
        } else {
            count = static_cast<long>(v.integer);
        }
    }

    // How the series is given.
    const bool daily = t.find("times") != nullptr;
    if (daily) {
        if (!typo && !daily_times(c, t, start_clock, start_clock_written, d.spec, &d.keys.times)) ok = false;
    } else if (const Entry* days = t.find("days")) {
        c.error(days->key_pos, "'days' needs 'times'", "times = [\"08:00\", \"20:00\"] with days = <number of days>, "
                "or count = <number of doses> with every", 4);
        ok = false;
    } else if (typo) {
        // reported above
    } else if (count_e != nullptr && until.present) {
        c.value_error(*until.v, "'count' and 'until' cannot both be given",
                      "one of them: count = <number of doses> or until = \"<time>\"");
        ok = false;
    } else if (every.present && count_e == nullptr && !until.present) {
        c.value_error(*every.v, "'every' needs 'count' or 'until' to say when the doses stop",
                      "count = <number of doses> or until = \"<time>\" in this [[doses]] entry");
        ok = false;
    } else if (!every.present && until.present) {
        c.value_error(*until.v, "'until' needs 'every'", "every = \"<interval>\", like \"8 h\"");
        ok = false;
    } else if (!every.present && count_e != nullptr && count != 1) {
        c.error(count_e->value.pos, "'count' needs 'every'", "every = \"<interval>\", like \"8 h\"");
        ok = false;
    }
    if (!typo && over.present && rate.present) {
        c.value_error(*rate.v, "'over' and 'rate' cannot both be given",
                      "one of them: over = \"<duration>\" or rate = \"<amount per time>\"");
        ok = false;
    }

    const double first = at.ok ? at.value : 0.0;
    const double interval = every.ok ? every.value : 0.0;
    if (ok && !daily && until.ok && interval > 0.0) {
        if (!regimen::before(first, until.value)) {
            c.value_error(*until.v, "'until' (" + hours(until.value) + ") is not after the first dose (" + hours(first) + ")",
                          "a time after 'at'");
            ok = false;
        } else {
            // Doses at first + k*every strictly before until; counted in double so huge counts are refused at once.
            double n = std::max(1.0, std::ceil((until.value - regimen::instant_tolerance(until.value) - first) / interval));
            if (n > static_cast<double>(regimen::kMaxDoses)) {
                c.value_error(*until.v, "'until' gives " + fmt(n) + " doses in this [[doses]] entry",
                              "at most " + std::to_string(regimen::kMaxDoses) + " doses");
                ok = false;
            } else {
                count = static_cast<long>(n);
            }
        }
    }

    d.keys.at = value_pos(c.doc, at.v, t.pos);
    d.keys.every = value_pos(c.doc, every.v, t.pos);
    d.keys.over = value_pos(c.doc, over.present ? over.v : rate.v, t.pos);
    if (ok) {
        d.spec.amount = amount.value;
        if (!daily) {
            d.spec.at = first;
            d.spec.every = interval;
            d.spec.count = count;
        }
        d.spec.over = over.ok ? over.value : rate.ok ? amount.value / rate.value : 0.0;
        if (!deviations(c, t, start_clock, d.spec)) ok = false;
    }
    d.ok = ok;
    return d;
}

void load_overrides(Ctx& c, const Value& table, const model::Model& m, regimen::Regimen& r,
                    std::vector<const Value*>& values) {
    std::vector<std::string> names;
    for (const auto& p : m.parameters) names.push_back(p.name);
    for (const Entry& e : table.entries) {
        int idx = m.parameter_index(e.key);
        if (idx < 0) {
            c.error(e.key_pos, "unknown parameter '" + e.key + "' in model '" + m.id + "'" + did_you_mean(e.key, names), one_of(names),
                    static_cast<int>(e.key.size()));
            continue;
        }
        const model::Parameter& p = m.parameters[static_cast<std::size_t>(idx)];
        if (p.kind != model::ParamKind::Fixed) {
            c.error(e.key_pos, "'" + e.key + "' is a " + (p.kind == model::ParamKind::Covariate ? "covariate" : "derived parameter") +
                                   " of model '" + m.id + "'",
                    p.kind == model::ParamKind::Covariate ? "its value in [patient]" : "values for its inputs instead",
                    static_cast<int>(e.key.size()));
            continue;
        }
        std::string example = fmt(units::to_unit(p.value, p.unit));
        if (!p.unit_text.empty()) example += " " + p.unit_text;
        auto q = quantity(c, e.value, e.key, p.dim, example, p.dim.dimensionless());
        if (!q) continue;
        if (!physical_value_ok(c, e.value, e.key, p.unit_text, p.dim, q->value)) continue;
        regimen::Override o;
        o.name = e.key;
        o.index = idx;
        o.value = q->value;
        o.pos = e.value.kind == Kind::String ? string_pos(c.doc, e.value, 0) : e.value.pos;
        r.overrides.push_back(o);
        values.push_back(&e.value);
    }
    // The model's route constants, recomputed with these values.
    for (const auto& prob : route_constant_problems(m, r.parameter_values())) {
        const model::Route& route = m.routes[static_cast<std::size_t>(prob.route)];
        const expr::Node& e = prob.lag ? *route.lag : *route.fraction;
        std::vector<std::string> used;
        for (const expr::Node* n : variables(e)) used.push_back(n->name);
        for (std::size_t i = 0; i < r.overrides.size(); ++i) {
            if (std::find(used.begin(), used.end(), r.overrides[i].name) == used.end()) continue;
            c.value_error(*values[i], route_constant_message(route.name, prob) + " with the parameter values of this regimen",
                          route_constant_expected(prob));
            break;
        }
    }
}

// A [low, high] pair of quantities of one dimension, 0 <= low <= high.
std::optional<std::pair<double, double>> range(Ctx& c, const Value& v, const std::string& key, units::Dim dim,
                                               const std::string& unit, const char* lo_eg, const char* hi_eg) {
    const std::string expected = key + " = [low, high] with 0 <= low <= high, like [\"" + lo_eg + unit + "\", \"" +
                                 hi_eg + unit + "\"]";
    if (v.kind != Kind::Array) {
        wrong_kind(c, v, key, "an array of two values", expected);
    } else if (v.items.size() != 2) {
        c.error(v.pos, "'" + key + "' must have two values, not " + std::to_string(v.items.size()), expected);
    } else {
        auto low = quantity(c, v.items[0], key, dim, lo_eg + unit);
        auto high = quantity(c, v.items[1], key, dim, hi_eg + unit);
        if (low && low->value < 0.0)
            c.value_error(v.items[0], "the low end of '" + key + "' is negative", expected);
        else if (low && high && low->value > high->value)
            c.error(v.pos, "the low end of '" + key + "' ('" + v.items[0].str + "') is above its high end ('" +
                    v.items[1].str + "')", expected);
        else if (low && high)
            return std::make_pair(low->value, high->value);
    }
    return std::nullopt;
}

void load_targets(Ctx& c, const Value* t, const model::Model& m, regimen::Targets& out) {
    std::vector<std::string> names;
    for (const auto& o : m.outputs) names.push_back(o.name);
    int idx = m.outputs.empty() ? -1 : 0;
    if (t != nullptr) {
        if (const Value* o = get_string(c, *t, "output", false, "[targets]", "output = \"<output name>\"")) {
            idx = m.output_index(o->str);
            if (idx < 0) c.value_error(*o, "unknown output '" + o->str + "' in model '" + m.id + "'" + did_you_mean(o->str, names), one_of(names));
        }
    }
    if (idx < 0) return;
    const model::Output& output = m.outputs[static_cast<std::size_t>(idx)];
    out.output = output.name;
    if (t == nullptr) return;
    const units::Dim dim = output.unit.dim;
    const std::string unit = output.unit_text.empty() ? std::string() : " " + output.unit_text;
    if (const Entry* a = t->find("above")) {
        if (auto q = quantity(c, a->value, "above", dim, "4" + unit)) {
            if (!(q->value > 0.0))
                c.value_error(a->value, "'above' must be more than 0, got '" + a->value.str + "'",
                              "a threshold above 0, like \"4" + unit + "\"");
            else
                out.above = q->value;
        }
    }
    if (const Entry* w = t->find("window")) out.window = range(c, w->value, "window", dim, unit, "10", "20");
    if (const Entry* f = t->find("above_for")) {
        if (auto q = quantity(c, f->value, "above_for", units::kNone, "50 %")) {
            if (!(q->value > 0.0 && q->value <= 1.0))
                c.value_error(f->value, "'above_for' must be more than 0 % and at most 100 %, got '" + f->value.str + "'",
                              "the share of each interval to spend above the threshold, like \"50 %\"");
            else if (!out.above)
                c.value_error(f->value, "'above_for' needs a threshold", "above = \"4" + unit + "\" in [targets]");
            else
                out.above_for = q->value;
        }
    }
    if (const Entry* a = t->find("auc24")) {
        const std::string au = output.unit_text.empty() ? " h" : " " + output.unit_text + "*h";
        out.auc24 = range(c, a->value, "auc24", dim * units::kTime, au, "400", "600");
    }
}

// The [horizon] table; the default `until` is filled in later from the doses.
void load_horizon(Ctx& c, const Value* t, regimen::Horizon& out, const Value*& until_v, const Value*& step_v,
                  bool& ok) {
    until_v = nullptr;
    step_v = nullptr;
    if (t == nullptr) return;
    if (const Entry* u = t->find("until")) {
        until_v = &u->value;
        if (auto q = quantity(c, u->value, "until", kTime, "7 d")) {
            if (!(q->value > 0.0)) {
                c.value_error(u->value, "the horizon must be more than 0, got '" + u->value.str + "'",
                              "a time above 0, like \"7 d\"");
                ok = false;
            } else if (q->value > regimen::kMaxHorizonHours) {
                c.value_error(u->value,
                              "the horizon '" + u->value.str + "' (" + hours(q->value) + ") is longer than 10 years",
                              "at most 10 years (" + hours(regimen::kMaxHorizonHours) + ")");
                ok = false;
            } else {
                out.until = q->value;
            }
        } else {
            ok = false;
        }
    }
    if (const Entry* s = t->find("step")) {
        step_v = &s->value;
        if (auto q = quantity(c, s->value, "step", kTime, "15 min")) {
            if (!(q->value > 0.0)) {
                c.value_error(s->value, "the step must be more than 0, got '" + s->value.str + "'",
                              "a time above 0, like \"15 min\"");
                ok = false;
            } else {
                out.step = q->value;
            }
        } else {
            ok = false;
        }
    }
}

// Checks across [[doses]] and [horizon]: totals, the default horizon, doses past the end, the grid size.
// The lag of each entry's route with the regimen's parameter values (0 without a model or a lag).
std::vector<double> entry_lags(const std::vector<DoseEntry>& doses, const model::Model* m, const regimen::Regimen& r) {
    std::vector<double> lags(doses.size(), 0.0);
    if (m == nullptr) return lags;
    const std::vector<double> values = r.parameter_values();
    for (std::size_t i = 0; i < doses.size(); ++i) {
        const int ri = doses[i].spec.route_index;
        if (ri < 0 || static_cast<std::size_t>(ri) >= m->routes.size()) continue;
        const auto& route = m->routes[static_cast<std::size_t>(ri)];
        if (!route.lag) continue;
        const double lag = model::evaluate_constant(*m, *route.lag, values);
        if (std::isfinite(lag) && lag > 0.0) lags[i] = lag;
    }
    return lags;
}

void check_schedule(Ctx& c, const std::vector<DoseEntry>& doses, const std::vector<double>& lags, regimen::Horizon& h,
                    const Value* until_v, const Value* step_v, const Value& root, std::vector<regimen::Warning>& warnings) {
    long long total = 0;
    double mass = 0.0;
    for (const auto& d : doses) {
        total += d.spec.doses();
        if (total > regimen::kMaxDoses) {
            c.error(d.spec.pos,
                    "too many doses: " + std::to_string(total) + " in [[doses]] entries 1 to " + std::to_string(d.number),
                    "at most " + std::to_string(regimen::kMaxDoses) + " doses in all [[doses]] entries");
            return;
        }
        // Totals and times derived from the entries must stay finite numbers, or reports print "inf".
        mass += d.spec.amount * static_cast<double>(d.spec.count);
        const double last = d.spec.at + static_cast<double>(d.spec.count - 1) * d.spec.every + d.spec.over;
        if (!std::isfinite(mass) || !std::isfinite(last)) {
            const std::string what = !std::isfinite(mass)           ? "the total amount of [[doses]] entries 1 to "
                                     : !std::isfinite(d.spec.over) ? "the infusion length (amount / rate) of [[doses]] entry "
                                                                   : "the last dose's end of [[doses]] entry ";
            c.error(d.spec.pos, what + std::to_string(d.number) + " is beyond what a double can hold",
                    "amounts, rates and times whose totals stay below 1e308 (mg, h)");
            return;
        }
    }
    auto last_time = [](const regimen::DoseSpec& s) { return s.last_time(); };
    if (until_v == nullptr) {
        const DoseEntry* latest = nullptr;
        double end_of_input = 0.0, latest_lag = 0.0;
        for (std::size_t i = 0; i < doses.size(); ++i) {
            const auto& d = doses[i];
            double last = last_time(d.spec);
            if (latest == nullptr || last > last_time(latest->spec) ||
                (last == last_time(latest->spec) && d.spec.every > latest->spec.every)) {
                latest = &d;
                latest_lag = lags[i];
            }
            // A route's lag delays the input: the horizon covers the delayed last dose too.
            end_of_input = std::max(end_of_input, last + lags[i] + d.spec.over);
        }
        if (latest == nullptr) return;
        const double last = last_time(latest->spec);
        if (last > regimen::kMaxHorizonHours) {
            c.error(latest->spec.pos,
                    entry_name(*latest) + ": the last dose is at " + hours(last) + ", later than 10 years",
                    "doses within 10 years (" + hours(regimen::kMaxHorizonHours) + ")");
            return;
        }
        h.until = std::max(last + latest_lag + std::max(latest->spec.every, 24.0), end_of_input);
        h.until = std::min(h.until, regimen::kMaxHorizonHours);
    } else {
        for (std::size_t i = 0; i < doses.size(); ++i) {
            const auto& d = doses[i];
            const regimen::DoseSpec& s = d.spec;
            const double last = last_time(s);
            if (regimen::before(last, h.until) && !regimen::before(last + lags[i], h.until)) {
                warnings.push_back({value_pos(c.doc, until_v, s.pos), entry_name(d) + ": the route's lag (" + hours(lags[i]) + ") delays the last dose, at " +
                                               hours(last) + ", to the end of the horizon or later: it has no effect"});
                continue;
            }
            if (regimen::before(last, h.until)) continue;
            // The first dose of the entry at or after the horizon end.
            long k = 1;
            while (k < s.doses() && s.dose_time(k) < h.until) ++k;
            const double when = s.dose_time(k);
            std::string what = s.doses() == 1 ? "the dose at " + hours(when)
                                              : "dose " + std::to_string(k) + " of " + std::to_string(s.doses()) +
                                                    ", at " + hours(when) + ",";
            c.error(s.pos, entry_name(d) + ": " + what +
                               (when > h.until ? " is after the horizon ends at " + hours(h.until)
                                               : " is at the end of the horizon, where it can have no effect"),
                    "a [horizon] until later than " + hours(last) + ", or fewer doses");
        }
    }
    const double points = h.until / h.step;
    if (points > static_cast<double>(regimen::kMaxGridPoints)) {
        const std::string expected = "at most " + std::to_string(regimen::kMaxGridPoints) +
                                     " points: a step of at least " + hours(h.until / static_cast<double>(regimen::kMaxGridPoints));
        const std::string message = "the output grid would have " + fmt(std::floor(points)) + " points";
        if (step_v != nullptr) c.value_error(*step_v, message, expected);
        else if (until_v != nullptr) c.value_error(*until_v, message, expected);
        else c.error(root.pos, message, expected);
    }
}

// Times the file writes as different but that are one instant to the engine, and infusions shorter than that
// resolution (given as boluses): they run, but not quite as written, so the user is told.
void resolution_warnings(regimen::Regimen& r, const std::vector<DoseEntry>& entries) {
    struct Written {
        double t;
        std::size_t entry;
        long n;   // dose number within its entry
    };
    std::vector<Written> times;
    for (std::size_t e = 0; e < r.doses.size(); ++e) {
        const auto& d = r.doses[e];
        for (long n = 1; n <= d.doses(); ++n) times.push_back({d.dose_time(n), e, n});
        if (d.over > 0.0 && !regimen::before(d.first_time(), d.first_time() + d.over))
            r.warnings.push_back({entries[e].keys.over,
                                  "[[doses]] entry " + std::to_string(e + 1) + ": the infusion lasts " + fmt(d.over) +
                                      " h, shorter than the time resolution (" +
                                      fmt(regimen::instant_tolerance(d.first_time())) +
                                      " h): each dose is given as a bolus"});
    }
    std::sort(times.begin(), times.end(), [](const Written& a, const Written& b) { return a.t < b.t; });
    for (std::size_t i = 1; i < times.size(); ++i) {
        const Written &a = times[i - 1], &b = times[i];
        if (a.t == b.t || !regimen::same_instant(a.t, b.t)) continue;
        char buf[96];
        std::snprintf(buf, sizeof buf, "doses at %.12g h and %.12g h", a.t, b.t);
        // The key that puts the later dose there: a clock time of a daily pattern, 'every' for a dose of a series
        // too close to the one before it in the same series, 'at' otherwise.
        const DoseKeys& k = entries[b.entry].keys;
        const regimen::DoseSpec& bs = r.doses[b.entry];
        const std::size_t per = bs.offsets.size();
        const SourcePos where = !k.times.empty()          ? k.times[static_cast<std::size_t>(b.n - 1) % per]
                                : a.entry == b.entry && b.n > 1 ? k.every
                                                                : k.at;
        r.warnings.push_back({where, std::string(buf) +
                                                        " are closer than the time resolution (" + fmt(regimen::kInstantRelative) +
                                                        " of the time, at least " + fmt(regimen::kInstantRelative) +
                                                        " h) and are given at one instant"});
        break;  // one is enough to point at the problem
    }
    std::stable_sort(r.warnings.begin(), r.warnings.end(),
                     [](const regimen::Warning& a, const regimen::Warning& b) {
                         return a.pos.line != b.pos.line ? a.pos.line < b.pos.line : a.pos.col < b.pos.col;
                     });
}

}  // namespace

}  // namespace detail

regimen::Regimen load_regimen(const std::string& path, const std::vector<std::string>& model_dirs) {
    using namespace detail;
    Document doc = read_document(path);
    DiagnosticSink sink;
    hoist_misplaced_keys(doc, sink, {"id", "model", "about", "start_clock"});
    Ctx c{doc, sink};
    regimen::Regimen r;
    r.path = path;
    const Value& root = doc.root;
    if (root.entries.empty()) {
        c.error(root.pos, "empty file: no regimen in it", "a regimen file with id, model and [[doses]]");
        sink.throw_if_any();
    }
    check_keys(c, root, {"id", "model", "about", "start_clock", "parameters", "patient", "doses", "targets", "horizon"},
               "a regimen file");
    if (const Entry* sc = root.find("start_clock"))
        if (auto ct = clock_time(c, sc->value, "start_clock", false)) r.start_clock = ct->hour;
    if (const Value* id = get_string(c, root, "id", true, "the regimen file", "id = \"<regimen name>\"")) {
        if (id->str.empty()) c.value_error(*id, "the regimen id is empty", "a name, like \"q8h-1g\"");
        r.id = id->str;
    }
    if (const Value* a = get_string(c, root, "about", false, "the regimen file", "a description in a string"))
        r.about = a->str;

    bool model_ok = false;
    if (const Value* ref = get_string(c, root, "model", true, "the regimen file",
                                      "model = \"<model id>\" or a path like \"../models/my-model.toml\"")) {
        r.model_ref = ref->str;
        model_ok = resolve_model(c, *ref, model_dirs, r.model);
    }
    const model::Model* m = model_ok ? &r.model : nullptr;

    if (const Value* p = get_table(c, root, "parameters", false, "the regimen file", "[parameters] with lines like cl = \"4 L/h\"")) {
        std::vector<const Value*> values;
        if (m != nullptr) load_overrides(c, *p, *m, r, values);
    }

    const Value* patient = get_table(c, root, "patient", false, "the regimen file", "[patient] with lines like wt = \"82 kg\"");
    if (patient != nullptr && m != nullptr) load_patient(c, *patient, *m, r);

    std::vector<DoseEntry> doses;
    bool doses_ok = true;
    if (const Entry* d = root.find("doses")) {
        const Value& v = d->value;
        const std::string expected = "[[doses]] sections, each with route and amount";
        if (v.kind != Kind::Array) {
            wrong_kind(c, v, "doses", "an array of tables", expected);
            doses_ok = false;
        } else if (v.items.empty()) {
            c.error(v.pos, "no doses: 'doses' is empty", expected);
            doses_ok = false;
        }
        for (const Value& item : v.items) {
            if (item.kind != Kind::Table) {
                c.error(item.pos, "each entry of 'doses' must be a table, not " + kind_name(item.kind), expected);
                doses_ok = false;
                continue;
            }
            doses.push_back(parse_dose(c, item, static_cast<int>(doses.size()) + 1, m, r.start_clock,
                                       root.find("start_clock") != nullptr));
            if (!doses.back().ok) doses_ok = false;
        }
    } else {
        c.missing(root, "doses", "the regimen file",
                  "at least one [[doses]] section with route and amount, like route = \"iv\", amount = \"500 mg\"");
        doses_ok = false;
    }

    const Value* targets = get_table(c, root, "targets", false, "the regimen file", "[targets] with output, above, above_for, window, auc24");
    r.targets.pos = targets != nullptr ? targets->pos : root.pos;
    if (targets != nullptr) check_keys(c, *targets, {"output", "above", "above_for", "window", "auc24"}, "[targets]");
    if (m != nullptr) load_targets(c, targets, *m, r.targets);

    const Value* horizon = get_table(c, root, "horizon", false, "the regimen file", "[horizon] with until and step");
    r.horizon.pos = horizon != nullptr ? horizon->pos : root.pos;
    if (horizon != nullptr) check_keys(c, *horizon, {"until", "step"}, "[horizon]");
    const Value *until_v = nullptr, *step_v = nullptr;
    bool horizon_ok = true;
    load_horizon(c, horizon, r.horizon, until_v, step_v, horizon_ok);

    if (doses_ok && horizon_ok)
        check_schedule(c, doses, entry_lags(doses, m, r), r.horizon, until_v, step_v, root, r.warnings);
    for (auto& d : doses) r.doses.push_back(d.spec);
    if (doses_ok && m != nullptr) resolve_per_size(c, r);
    if (sink.empty()) resolution_warnings(r, doses);

    throw_sorted(sink, path);
    return r;
}

}  // namespace plateau::input
