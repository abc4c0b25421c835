// A one-compartment IV-bolus model where only clearance varies (log-normal, CV 30 %), and a regimen of 500 mg
// every 12 h judged on the steady-state trough: the case with an exact PTA, shared by the population and the
// population-dose tests.
#pragma once

namespace plateau::test {

inline constexpr const char* kClVariesModel = R"(id = "one-cpt-cl-varies"
summary = "one compartment, IV bolus; only clearance varies"
[parameters]
cl = { value = "5 L/h" }
v  = { value = "40 L" }
[variability]
cl = "30 %"
[compartments]
central = "mg"
[rates]
central = "-cl/v*central"
[outputs]
conc = { expr = "central/v", unit = "mg/L" }
[routes]
iv = { into = "central" }
)";

// 500 mg every 12 h, 12 doses; the threshold judged on the whole interval, i.e. on the trough (3.59 mg/L for
// the typical clearance, so the PTA is near one half).
inline constexpr const char* kClVariesRegimen = R"(id = "q12h"
model = "model.toml"
[[doses]]
route = "iv"
amount = "500 mg"
every = "12 h"
count = 12
[targets]
above = "3.5 mg/L"
)";

}  // namespace plateau::test
