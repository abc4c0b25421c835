// The three benchmark problems: the model as the engine sees it, the same right-hand side for the reference
// integrators, the dose list, the hourly check times and the exact concentration at each check time.
#pragma once

#include <string>
#include <vector>

#include "model/model.hpp"
#include "sim/events.hpp"

namespace plateau::bench {

enum class Kind { OralOneCompartment, TwoCompartmentIv, MichaelisMenten };

// Right-hand side in the form the reference integrators call: dx/dt = f(x, t). States are amounts (mg), time h.
struct Rhs {
    Kind kind = Kind::OralOneCompartment;
    double p1 = 0.0, p2 = 0.0, p3 = 0.0;  // (ka, k) | (k10, k12, k21) | (vmax, km, v)
    void eval(const double* x, double* dxdt) const;
    void operator()(const std::vector<double>& x, std::vector<double>& dxdt, double t) const;
};

struct Problem {
    std::string name;
    model::Model model;             // built in code, rates through expr::parse
    std::vector<double> params;     // in the order of model.parameters
    std::vector<sim::Dose> doses;   // nominal doses (the route applies the fraction)
    double t_end = 0.0;             // h
    Rhs rhs;
    int n_states = 0;
    int dose_state = 0;             // compartment that receives each dose
    double dose_amount = 0.0;       // mg reaching that compartment per dose (fraction applied)
    std::vector<double> dose_times; // h, sorted
    int conc_state = 0;             // concentration = x[conc_state] / conc_volume
    double conc_volume = 1.0;
    int conc_series = 0;            // series index of the concentration output in the engine's trajectory
    std::vector<double> checks;     // check times (h)
    std::vector<double> exact;      // concentration (mg/L) at each check time, right-continuous at doses
    std::string reference;          // how `exact` was computed
};

// (a) one compartment, first-order absorption: ka 1.2/h, CL 5 L/h, V 40 L, F 0.8, 500 mg oral every 12 h.
Problem oral_one_compartment();
// (b) two compartments, IV bolus: k10 0.192, k12 1.86, k21 1.68 /h, V1 35.295 L, 500 mg every 12 h.
Problem two_compartment_iv();
// (c) one compartment, Michaelis-Menten elimination: Vmax 490 mg/day, Km 4 mg/L, V 49 L, 300 mg IV every 24 h.
Problem michaelis_menten();

// Largest |c - exact| / |exact| over the check times.
double max_relative_error(const Problem& p, const std::vector<double>& conc);

}  // namespace plateau::bench
