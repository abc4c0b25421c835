#include "runners.hpp"

#include <stdexcept>

namespace plateau::bench {

const char* method_name(Method m) {
    switch (m) {
        case Method::Taylor: return "taylor";
        case Method::Dopri5: return "odeint dopri5";
        case Method::Fehlberg78: return "odeint rkf78";
        case Method::Dopri5Dense: return "odeint dopri5 dense";
        case Method::Cvode: return "cvode bdf";
    }
    return "?";
}

bool available(Method m) {
#ifdef PLATEAU_HAVE_CVODE
    (void)m;
    return true;
#else
    return m != Method::Cvode;
#endif
}

Run run_job(const Problem& p, Method m, double tol) {
    switch (m) {
        case Method::Taylor: return taylor_job(p, tol);
        case Method::Dopri5:
        case Method::Fehlberg78:
        case Method::Dopri5Dense: return odeint_job(p, m, tol);
        case Method::Cvode:
#ifdef PLATEAU_HAVE_CVODE
            return cvode_job(p, tol);
#else
            break;
#endif
    }
    throw std::logic_error("method not built");
}

long run_integrate_only(const Problem& p, Method m, double tol) {
    switch (m) {
        case Method::Taylor: return taylor_integrate_only(p, tol);
        case Method::Dopri5:
        case Method::Fehlberg78:
        case Method::Dopri5Dense: return odeint_integrate_only(p, m, tol);
        case Method::Cvode:
#ifdef PLATEAU_HAVE_CVODE
            return cvode_integrate_only(p, tol);
#else
            break;
#endif
    }
    throw std::logic_error("method not built");
}

}  // namespace plateau::bench
