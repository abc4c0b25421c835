// The caution printed with every result.
#pragma once

namespace plateau::report {

inline constexpr const char* kCaution =
    "Research simulation only, not clinical advice: dosing decisions belong to licensed prescribers under "
    "local protocols.";

}  // namespace plateau::report
