// The cautions every output carries, in breathbeat's own words.
#pragma once

#include <string>
#include <vector>

namespace bb {

// The four standing cautions: decision support only; indices hold only under
// their conditions; numbers checked against the patient; local protocols and
// licensed practice decide.
std::vector<std::string> standard_cautions();

}  // namespace bb
