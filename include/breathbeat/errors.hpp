// Errors that point at the exact input: which file, line and column, which
// field, what value was given and what was expected.
#pragma once

#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

namespace bb {

// Where a value came from: a file position (toml++ source region), or nothing
// for command-line options.
struct SourcePlace {
  std::string file;
  int line = 0;
  int column = 0;
};

// Bad input from the user. The command line turns it into exit code 2 with the
// message on stderr and nothing on stdout.
class InputError : public std::runtime_error {
 public:
  InputError(std::string field, std::string value, std::string problem, std::string expected,
             std::optional<SourcePlace> where = std::nullopt);

  const std::string& field() const { return field_; }
  const std::string& value() const { return value_; }
  const std::string& problem() const { return problem_; }
  const std::string& expected() const { return expected_; }
  const std::optional<SourcePlace>& where() const { return where_; }

  // A copy of this error placed at a file position (used when a value parsed
  // from a file is checked after parsing).
  InputError at(SourcePlace place) const;

 private:
  std::string field_;
  std::string value_;
  std::string problem_;
  std::string expected_;
  std::optional<SourcePlace> where_;
};

// Formats "file:line:column: field 'x': <problem> (got 'v'); expected ...".
std::string describe(const InputError& error);

// Several input errors found in one pass (breathbeat check lists them all).
class InputErrors : public std::runtime_error {
 public:
  explicit InputErrors(std::vector<InputError> errors);
  const std::vector<InputError>& errors() const { return errors_; }

 private:
  std::vector<InputError> errors_;
};

}  // namespace bb
