// Helpers shared by the command implementations (not part of the command API in commands.hpp).
#pragma once

#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "cli/commands.hpp"
#include "core/diagnostic.hpp"
#include "plot/plot.hpp"
#include "regimen/regimen.hpp"

namespace plateau::cli {

inline constexpr std::size_t kWidth = 100;  // terminal columns
inline constexpr std::size_t kLabel = 10;   // label column of the run summary
inline constexpr int kSummaryDigits = 8;
inline constexpr int kParameterDigits = 10; // parameter values with the digits a file would give them

std::string num(double x, int digits = kSummaryDigits);
std::string plural(std::size_t n, std::string_view word);
std::string_view trim(std::string_view s);
std::string quoted(std::string_view s);
std::string join(const std::vector<std::string>& v, std::string_view sep = ", ");
std::string with_unit(double value, const std::string& unit_text, int digits = kSummaryDigits);
std::string hours(double h);                          // "36 h", "72 h (3 d)"
// The --models directories, then the built-in ones and PLATEAU_MODELS.
std::vector<std::string> model_dirs(const std::vector<std::string>& extra);
// Aligned columns; the last column is wrapped to the terminal width.
std::string format_table(const std::vector<std::vector<std::string>>& rows, std::size_t indent);
// "Label     text", the text wrapped under itself.
void labelled(std::ostream& out, std::string_view label, std::string_view text);
std::string format_error(const InputError& e);
// Index of the regimen's target output (first output when unset), −1 when the model has none.
int output_of_target(const regimen::Regimen& r);

// Runs a command body, mapping exceptions to messages on `err` and to exit codes.
template <class F>
int guarded(std::ostream& err, F&& body) {
    try {
        return body();
    } catch (const InputError& e) {
        err << format_error(e);
        return kExitBadInput;
    } catch (const UsageError& e) {
        err << "error: " << e.what() << '\n';
        return kExitBadInput;
    } catch (const plot::PlotError& e) {
        // gnuplot missing or failing: the request could not be met, like a bad option.
        err << "error: " << e.what() << '\n';
        return kExitBadInput;
    } catch (const NumericalError& e) {
        err << "error: " << e.what() << '\n';
        return kExitNumerical;
    } catch (const std::exception& e) {
        err << "internal error: " << e.what() << '\n';
        return kExitInternal;
    }
}

}  // namespace plateau::cli
