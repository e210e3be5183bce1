#include "breathbeat/errors.hpp"

#include <utility>

namespace bb {

namespace {
std::string compose(const std::string& field, const std::string& value, const std::string& problem,
                    const std::string& expected, const std::optional<SourcePlace>& where) {
  std::string out;
  if (where && !where->file.empty()) {
    out += where->file;
    if (where->line > 0) out += ":" + std::to_string(where->line) + ":" + std::to_string(where->column);
    out += ": ";
  }
  if (!field.empty()) out += "field '" + field + "': ";
  out += problem;
  if (!value.empty()) out += " (got '" + value + "')";
  if (!expected.empty()) out += "; expected " + expected;
  return out;
}
}  // namespace

InputError::InputError(std::string field, std::string value, std::string problem,
                       std::string expected, std::optional<SourcePlace> where)
    : std::runtime_error(compose(field, value, problem, expected, where)),
      field_(std::move(field)),
      value_(std::move(value)),
      problem_(std::move(problem)),
      expected_(std::move(expected)),
      where_(std::move(where)) {}

InputError InputError::at(SourcePlace place) const {
  return InputError(field_, value_, problem_, expected_, std::move(place));
}

std::string describe(const InputError& error) { return error.what(); }

namespace {
std::string join_errors(const std::vector<InputError>& errors) {
  std::string out;
  for (const auto& e : errors) {
    if (!out.empty()) out += "\n";
    out += e.what();
  }
  return out;
}
}  // namespace

InputErrors::InputErrors(std::vector<InputError> errors)
    : std::runtime_error(join_errors(errors)), errors_(std::move(errors)) {}

}  // namespace bb
