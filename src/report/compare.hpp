// The terminal report of several regimens of the same output: the comparison table (report/compare_model), the
// targets each regimen meets and the plain-words summary (both computed in verdict/). HTML in html.hpp.
#pragma once

#include <ostream>
#include <string>
#include <vector>

#include "verdict/compare.hpp"

namespace plateau::report {

// The writers take measured regimens as verdict/ defines them.
using verdict::Candidate;

struct CompareHeader {
    double tolerance = 1e-10;
    std::string date;                 // YYYY-MM-DD
    std::vector<std::string> notes;   // printed under the targets (e.g. targets taken from another file)
    std::string trailer;              // printed just before the closing caution (files written)
};

// "model 'x'" or "models 'x' (A, B), 'y' (C)" when the regimens use different models.
std::string models_line(const std::vector<Candidate>& cs);

// The whole terminal report: header, caution, table, targets, summary, caution. Fits 100 columns.
void write_compare_text(std::ostream& out, const std::vector<Candidate>& cs, const CompareHeader& h);

}  // namespace plateau::report
