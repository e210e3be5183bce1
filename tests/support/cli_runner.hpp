// Runs the breathbeat executable for end-to-end tests.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace bb::test {

struct CliResult {
  int exit_code = -1;
  std::string out;
  std::string err;
};

// Runs breathbeat with `args` (each passed as one argument, no shell), with
// `stdin_text` on standard input.
CliResult run_cli(const std::vector<std::string>& args, const std::string& stdin_text = "");

// Parses stdout as JSON (fails the test if it is not).
nlohmann::json parse_json(const CliResult& r);

// A fresh empty temporary directory for one test.
std::string temp_dir(const std::string& name);

// The bytes of a file (empty when it cannot be read).
std::string slurp(const std::string& path);

// `breathbeat report FILE` as text (the test fails unless it exits 0), its line
// wrapping undone: each run of blanks and newlines one blank.
std::string unwrapped_report_text(const std::string& file);

std::string source_dir();
std::string shared_data_dir();

}  // namespace bb::test
