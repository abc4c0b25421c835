// SUNDIALS CVODE, BDF with Newton iteration and a dense direct linear solver (finite-difference Jacobian):
// integrate from dose to dose with the dose time as stop time, re-initialise at each dose; values at the check
// times from CVODE's own interpolation (CV_NORMAL). Built only when configure found SUNDIALS.
// Written against the SUNDIALS 6.4 C API (double precision build assumed).
#ifdef PLATEAU_HAVE_CVODE

#include <cvode/cvode.h>
#include <nvector/nvector_serial.h>
#include <sundials/sundials_config.h>
#include <sunlinsol/sunlinsol_dense.h>
#include <sunmatrix/sunmatrix_dense.h>

#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

#include "runners.hpp"

namespace plateau::bench {

namespace {

int rhs(double /*t*/, N_Vector y, N_Vector ydot, void* user) {
    static_cast<const Rhs*>(user)->eval(N_VGetArrayPointer(y), N_VGetArrayPointer(ydot));
    return 0;
}

void check(int flag, const char* what) {
    if (flag < 0) throw std::runtime_error(std::string("CVODE: ") + what + " failed with flag " + std::to_string(flag));
}

// Owns the CVODE objects of one run.
class Cvode {
public:
    Cvode(const Problem& p, double tol) : rhs_(p.rhs) {
#if SUNDIALS_VERSION_MAJOR >= 7
        check(SUNContext_Create(SUN_COMM_NULL, &ctx_), "SUNContext_Create");
#else
        check(SUNContext_Create(nullptr, &ctx_), "SUNContext_Create");
#endif
        const auto n = static_cast<sunindextype>(p.n_states);
        y_ = N_VNew_Serial(n, ctx_);
        N_VConst(0.0, y_);
        mem_ = CVodeCreate(CV_BDF, ctx_);
        if (y_ == nullptr || mem_ == nullptr) throw std::runtime_error("CVODE: out of memory");
        check(CVodeInit(mem_, rhs, 0.0, y_), "CVodeInit");
        check(CVodeSStolerances(mem_, tol, tol), "CVodeSStolerances");
        check(CVodeSetUserData(mem_, &rhs_), "CVodeSetUserData");
        check(CVodeSetMaxNumSteps(mem_, 1'000'000), "CVodeSetMaxNumSteps");
        a_ = SUNDenseMatrix(n, n, ctx_);
        ls_ = SUNLinSol_Dense(y_, a_, ctx_);
        check(CVodeSetLinearSolver(mem_, ls_, a_), "CVodeSetLinearSolver");
    }
    Cvode(const Cvode&) = delete;
    Cvode& operator=(const Cvode&) = delete;
    ~Cvode() {
        CVodeFree(&mem_);
        SUNLinSolFree(ls_);
        SUNMatDestroy(a_);
        N_VDestroy(y_);
        SUNContext_Free(&ctx_);
    }

    double* y() { return N_VGetArrayPointer(y_); }

    // Adds the dose to y (the state at t0) and restarts there, with t1 as the stop time.
    void restart(double t0, double t1, int state, double amount, bool first) {
        if (!first) steps_ += counted();
        y()[state] += amount;
        check(CVodeReInit(mem_, t0, y_), "CVodeReInit");
        check(CVodeSetStopTime(mem_, t1), "CVodeSetStopTime");
    }

    // Advances to t (within the current dose interval); y() is then the value at t.
    void advance(double t) {
        double reached = 0.0;
        check(CVode(mem_, t, y_, &reached, CV_NORMAL), "CVode");
    }

    long steps() { return steps_ + counted(); }

private:
    long counted() {
        long n = 0;
        check(CVodeGetNumSteps(mem_, &n), "CVodeGetNumSteps");
        return n;
    }

    Rhs rhs_;
    SUNContext ctx_ = nullptr;
    N_Vector y_ = nullptr;
    SUNMatrix a_ = nullptr;
    SUNLinearSolver ls_ = nullptr;
    void* mem_ = nullptr;
    long steps_ = 0;
};

}  // namespace

Run cvode_job(const Problem& p, double tol) {
    Run r;
    r.conc.assign(p.checks.size(), std::numeric_limits<double>::quiet_NaN());
    Cvode cv(p, tol);
    std::size_t c = 0;
    const std::size_t n = p.dose_times.size();
    for (std::size_t k = 0; k < n; ++k) {
        const double t0 = p.dose_times[k];
        const double t1 = k + 1 < n ? p.dose_times[k + 1] : p.t_end;
        const bool last = k + 1 == n;
        cv.restart(t0, t1, p.dose_state, p.dose_amount, k == 0);
        for (; c < p.checks.size() && (p.checks[c] < t1 || (last && p.checks[c] <= t1)); ++c) {
            if (p.checks[c] < t0) continue;
            if (p.checks[c] > t0) cv.advance(p.checks[c]);
            r.conc[c] = cv.y()[p.conc_state] / p.conc_volume;
        }
        const bool at_end = last && c > 0 && p.checks[c - 1] == t1;  // already advanced to t1
        if (!at_end) cv.advance(t1);
    }
    r.steps = cv.steps();
    return r;
}

long cvode_integrate_only(const Problem& p, double tol) {
    Cvode cv(p, tol);
    const std::size_t n = p.dose_times.size();
    for (std::size_t k = 0; k < n; ++k) {
        const double t0 = p.dose_times[k];
        const double t1 = k + 1 < n ? p.dose_times[k + 1] : p.t_end;
        cv.restart(t0, t1, p.dose_state, p.dose_amount, k == 0);
        cv.advance(t1);
    }
    return cv.steps();
}

}  // namespace plateau::bench

#endif  // PLATEAU_HAVE_CVODE
