// The results of a dose search as text (a table ranked by daily dose, the recommended candidate marked with the
// rule, notes, the caution at top and bottom) and as JSON (every candidate). Nothing is computed here.
#pragma once

#include <ostream>
#include <string>
#include <vector>

#include "dose/population.hpp"
#include "dose/search.hpp"

namespace plateau::dose {

struct Report {
    const Template* tmpl = nullptr;
    std::vector<Goal> goals;
    Request request;
    double tolerance = 1e-10;
    int recommended = -1;            // index into the ranked candidates, −1 for none
    std::vector<std::string> notes;  // printed before the closing caution
    std::string trailer;             // files written
    // The population half (--pta): who the patients are, and the share asked.
    const PopulationRequest* population = nullptr;
    std::string who;                 // "cohort 'zelmarin-adults' (cohorts/zelmarin-adults.toml)"
};

void write_text(std::ostream& out, const Report& r, const std::vector<Found>& fs);
void write_json(std::ostream& out, const Report& r, const std::vector<Found>& fs);
// The population half: per candidate the population dose, its PTA with the Wilson interval, one step lower, the
// patients who cannot meet the targets at any dose.
void write_text(std::ostream& out, const Report& r, const std::vector<PopulationDose>& ds);
void write_json(std::ostream& out, const Report& r, const std::vector<PopulationDose>& ds);

// "8 h", "30 min" is written "0.5 h"; "bolus" for 0.
std::string duration_text(double h);

// How each dose of the template's maintenance series is given, over `over` hours: " as infusions over 4 h";
// at once, " as a bolus" on a route named iv and " by route 'oral'" on any other (an oral dose is no bolus).
std::string delivery_text(const Template& t, double over);

}  // namespace plateau::dose
