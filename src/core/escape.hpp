// Escaping text for XML and HTML (&, <, >, "), shared by the SVG figures, the HTML report and its tests.
#pragma once

#include <string>
#include <string_view>

namespace plateau {

std::string xml_escape(std::string_view text);

}  // namespace plateau
