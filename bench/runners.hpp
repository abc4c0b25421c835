// One run of one method on one problem. "Job" = integrate through every dose and deliver the concentration at
// every check time; "integrate only" = the same integration with no values asked at the check times.
#pragma once

#include <string>
#include <vector>

#include "problems.hpp"

namespace plateau::bench {

enum class Method { Taylor, Dopri5, Fehlberg78, Dopri5Dense, Cvode };

const char* method_name(Method m);

struct Run {
    std::vector<double> conc;  // concentration at each check time (NaN where the method failed)
    long steps = 0;            // accepted steps
    int order = 0;             // Taylor order (0 for the others)
};

// Whether this build has the method (CVODE needs SUNDIALS at configure time).
bool available(Method m);

Run run_job(const Problem& p, Method m, double tol);
long run_integrate_only(const Problem& p, Method m, double tol);

// The engine's loop (events, stepper, landing on each dose) without storing the steps: what the dense output
// costs. Returns the steps; `conc_end` receives the concentration at the horizon.
long run_taylor_no_store(const Problem& p, double tol, double& conc_end);
// The fixed cost of a Taylor run: events, tape, stepper. Returns the order; `n_events` the event count.
int taylor_setup(const Problem& p, double tol, std::size_t& n_events);

// Per-method entry points (one translation unit each).
Run taylor_job(const Problem& p, double tol);
long taylor_integrate_only(const Problem& p, double tol);
Run odeint_job(const Problem& p, Method m, double tol);
long odeint_integrate_only(const Problem& p, Method m, double tol);
#ifdef PLATEAU_HAVE_CVODE
Run cvode_job(const Problem& p, double tol);
long cvode_integrate_only(const Problem& p, double tol);
#endif

}  // namespace plateau::bench
