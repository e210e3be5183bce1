#include "cli_runner.hpp"

#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>

namespace bb::test {

namespace {
std::string read_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}
}  // namespace

CliResult run_cli(const std::vector<std::string>& args, const std::string& stdin_text) {
  const std::string dir = temp_dir("cli_run");
  const std::string in_path = dir + "/stdin", out_path = dir + "/stdout",
                    err_path = dir + "/stderr";
  { std::ofstream(in_path, std::ios::binary) << stdin_text; }
  pid_t pid = fork();
  if (pid == 0) {
    if (!freopen(in_path.c_str(), "rb", stdin) || !freopen(out_path.c_str(), "wb", stdout) ||
        !freopen(err_path.c_str(), "wb", stderr)) {
      _exit(127);
    }
    std::vector<char*> argv;
    std::string exe = BREATHBEAT_EXE;
    argv.push_back(exe.data());
    std::vector<std::string> copy = args;
    for (auto& a : copy) argv.push_back(a.data());
    argv.push_back(nullptr);
    execv(exe.c_str(), argv.data());
    _exit(127);
  }
  int status = 0;
  waitpid(pid, &status, 0);
  CliResult r;
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
  r.out = read_file(out_path);
  r.err = read_file(err_path);
  std::filesystem::remove_all(dir);
  return r;
}

nlohmann::json parse_json(const CliResult& r) {
  try {
    return nlohmann::json::parse(r.out);
  } catch (const std::exception& e) {
    ADD_FAILURE() << "stdout is not JSON: " << e.what() << "\n" << r.out << "\nstderr: " << r.err;
    return nlohmann::json::object();
  }
}

std::string temp_dir(const std::string& name) {
  namespace fs = std::filesystem;
  std::string pattern = (fs::temp_directory_path() / ("breathbeat_" + name + "_XXXXXX")).string();
  char* made = mkdtemp(pattern.data());
  if (!made) throw std::runtime_error("mkdtemp failed");
  return made;
}

std::string source_dir() {
  return BREATHBEAT_SOURCE_DIR;
}
std::string shared_data_dir() {
  return BREATHBEAT_SHARED_DATA;
}

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

std::string unwrapped_report_text(const std::string& file) {
  const CliResult r = run_cli({"report", file});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  std::string out;
  for (char c : r.out) {
    const bool blank = c == ' ' || c == '\n';
    if (blank && !out.empty() && out.back() == ' ') continue;
    out += blank ? ' ' : c;
  }
  return out;
}

}  // namespace bb::test
