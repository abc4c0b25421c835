// libFuzzer target: quantity and unit strings ("250 mg", "40 ((L^12)^12)", ...). A TextError is the expected
// answer to bad text; anything else (a crash, a sanitizer report, another exception) is a finding.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "core/diagnostic.hpp"
#include "units/units.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    using namespace plateau::units;
    try {
        const Quantity q = parse_quantity(text);
        // A quantity that parsed is finite and its dimension is one the checks can hold.
        if (!std::isfinite(q.value) || !q.dim.in_range()) std::abort();
        (void)dim_name(q.dim);
        (void)canonical_unit(q.dim);
    } catch (const plateau::TextError& e) {
        if (e.offset() > size) std::abort();  // a location must point into the text (or just past its end)
    }
    try {
        const Unit u = parse_unit(text);
        if (!std::isfinite(u.factor) || u.factor == 0.0 || !u.dim.in_range()) std::abort();
    } catch (const plateau::TextError& e) {
        if (e.offset() > size) std::abort();
    }
    try {
        (void)parse_quantity(text, kConc);
    } catch (const plateau::TextError&) {
    }
    return 0;
}
