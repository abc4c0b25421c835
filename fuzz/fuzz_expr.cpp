// libFuzzer target: a model expression, parsed, unit-checked against a small fixed model (central in mg, v in L,
// cl in L/h, k in 1/h, f dimensionless, t in h), printed, and evaluated. A TextError is the expected answer to
// bad text; a crash, a sanitizer report or another exception is a finding.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <optional>
#include <string>
#include <string_view>

#include "core/diagnostic.hpp"
#include "expr/expr.hpp"
#include "units/units.hpp"

namespace {

std::optional<plateau::units::Dim> dim_of(std::string_view name) {
    using namespace plateau::units;
    if (name == "central") return kMass;
    if (name == "v") return kVolume;
    if (name == "cl") return kFlow;
    if (name == "k") return kRate;
    if (name == "f") return kNone;
    if (name == "t") return kTime;
    return std::nullopt;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    using namespace plateau;
    expr::Ptr e;
    try {
        e = expr::parse(text);
    } catch (const TextError& err) {
        if (err.offset() > size) std::abort();
        return 0;
    }
    try {
        const units::Dim d = expr::infer_dim(*e, dim_of, [](std::string_view n) { return n != "central" && n != "t"; });
        if (!d.in_range()) std::abort();
    } catch (const TextError& err) {
        if (err.offset() > size) std::abort();
    }
    // Printing and parsing again gives the same text: the printer's parentheses keep the meaning.
    const std::string printed = expr::to_string(*e);
    expr::Ptr again;
    try {
        again = expr::parse(printed);
    } catch (const TextError& err) {
        // The printer adds parentheses ("- -x" prints as "-(-x)"), so input near the nesting limit may print
        // beyond it; that refusal is the parser's limit at work, not a finding.
        if (std::string_view(err.what()).find("nested too deeply") == std::string_view::npos) std::abort();
        return 0;
    }
    if (expr::to_string(*again) != printed) std::abort();
    (void)expr::identifiers(*e);
    (void)expr::evaluate(*e, [](std::string_view) { return 1.5; });
    return 0;
}
