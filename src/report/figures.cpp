#include "report/figures.hpp"

#include <array>
#include <stdexcept>

#include "report/format.hpp"

namespace plateau::report {

namespace {

constexpr std::array kFigures{
    FigureInfo{"dose_per_day", "Dose per day", Measure::DosePerDay},
    FigureInfo{"doses", "Doses (total mg)", Measure::None},
    FigureInfo{"first_peak", "First-dose peak", Measure::Concentration},
    FigureInfo{"ss_peak", "Steady-state peak", Measure::Concentration},
    FigureInfo{"ss_trough", "Steady-state trough", Measure::Concentration},
    FigureInfo{"ss_lowest", "Steady-state lowest", Measure::Concentration},
    FigureInfo{"ss_average", "Steady-state average", Measure::Concentration},
    FigureInfo{"auc24_day1", "AUC24, day 1", Measure::Exposure},
    FigureInfo{"auc_window", "AUC", Measure::Exposure},
    FigureInfo{"ss_auc24", "AUC24, steady state", Measure::Exposure},
    FigureInfo{"above_day1", "Time above threshold, day 1", Measure::Hours},
    FigureInfo{"above_worst_day", "Time above threshold, worst day", Measure::Hours},
    FigureInfo{"above_pct", "Time above threshold, ss", Measure::ShareOfCycle},
    FigureInfo{"first_reached", "First reaches threshold", Measure::Hours},
    FigureInfo{"window_pct", "Time in window, ss", Measure::ShareOfCycle},
    FigureInfo{"above_window_pct", "Time above window, ss", Measure::ShareOfCycle},
    FigureInfo{"within_10pct", "Within 10 % of steady state", Measure::Hours},
};

}  // namespace

const FigureInfo& figure_info(std::string_view key) {
    for (const auto& f : kFigures)
        if (f.key == key) return f;
    throw std::logic_error("report: no figure '" + std::string(key) + "' in the figure list");
}

std::string unit_text(Measure m, const model::Output& o) {
    switch (m) {
        case Measure::Concentration: return o.unit_text;
        case Measure::Exposure: return auc_unit(o.unit_text);
        case Measure::Hours: return "h";
        case Measure::ShareOfCycle: return "% of τ";
        case Measure::DosePerDay: return "mg/day";
        case Measure::None: return "";
    }
    return "";
}

}  // namespace plateau::report
