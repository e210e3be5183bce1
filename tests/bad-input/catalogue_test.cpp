// Walks the bad-input catalogue (tests/bad-input/manifest.txt): every case
// must exit 2 within a time limit (no crash, no hang), print nothing on
// stdout, name the file, field and place on stderr (the manifest's expected
// words) and leave every input byte-identical. Large or awkward inputs (the
// 100 MB junk file, deep nesting, non-UTF-8 bytes, EDF files, a directory) are
// generated here into a temporary folder, never checked in.
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

namespace fs = std::filesystem;

struct Case {
  std::string id, kind;
  std::vector<std::string> args;
  std::vector<std::string> words;
  int line = 0;
};

// For gtest's messages: the case by its id, not as bytes.
void PrintTo(const Case& c, std::ostream* os) {
  *os << c.id;
}

std::string trim(const std::string& s) {
  const auto a = s.find_first_not_of(" \t\r");
  if (a == std::string::npos) return "";
  const auto b = s.find_last_not_of(" \t\r");
  return s.substr(a, b - a + 1);
}

std::vector<std::string> split(const std::string& s, char sep) {
  std::vector<std::string> out;
  std::string part;
  std::istringstream in(s);
  while (std::getline(in, part, sep)) out.push_back(trim(part));
  return out;
}

std::string cases_dir() {
  return source_dir() + "/tests/bad-input/cases";
}

std::vector<Case> read_manifest() {
  std::ifstream in(source_dir() + "/tests/bad-input/manifest.txt");
  std::vector<Case> out;
  std::string line;
  int number = 0;
  while (std::getline(in, line)) {
    ++number;
    if (trim(line).empty() || trim(line)[0] == '#') continue;
    // " | " separates the columns (an argument may hold a single '|').
    std::vector<std::string> cols;
    std::size_t start = 0;
    for (;;) {
      const auto bar = line.find(" | ", start);
      cols.push_back(trim(line.substr(start, bar == std::string::npos ? bar : bar - start)));
      if (bar == std::string::npos) break;
      start = bar + 3;
    }
    Case c;
    c.line = number;
    if (cols.size() != 4) {
      c.id = "manifest_line_" + std::to_string(number);
      out.push_back(c);  // fails in the test: a malformed manifest line
      continue;
    }
    c.id = cols[0];
    c.kind = cols[1];
    std::istringstream args(cols[2]);
    for (std::string a; args >> a;) c.args.push_back(a);
    c.words = split(cols[3], ';');
    out.push_back(c);
  }
  return out;
}

// ---- generated inputs --------------------------------------------------------------

void write(const fs::path& p, const std::string& text) {
  std::ofstream(p, std::ios::binary) << text;
}

// 100 MB of pseudo-random bytes (a fixed linear congruential sequence, so
// every run reads the same junk), written in blocks.
void write_junk(const fs::path& p, std::size_t bytes) {
  std::ofstream out(p, std::ios::binary);
  std::uint64_t x = 88172645463325252ull;
  std::vector<char> block(1 << 20);
  for (std::size_t done = 0; done < bytes; done += block.size()) {
    for (char& b : block) {
      x = x * 6364136223846793005ull + 1442695040888963407ull;
      b = static_cast<char>(x >> 56);
    }
    out.write(block.data(), static_cast<std::streamsize>(std::min(block.size(), bytes - done)));
  }
}

std::string read_all(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

class Catalogue : public ::testing::TestWithParam<Case> {
 public:
  static void SetUpTestSuite() {
    tmp_ = temp_dir("bad_input");
    const fs::path t(tmp_);
    write(t / "deep-array.toml",
          "a = " + std::string(100000, '[') + std::string(100000, ']') + "\n");
    std::string deep = "[a";
    for (int i = 0; i < 20000; ++i) deep += ".a";
    write(t / "deep-table.toml", deep + "]\nb = 1\n");
    write(t / "non-utf8.toml",
          "[patient]\nsex = \"m\xff\xfe"
          "ale\"\nheight = 175\n");
    fs::create_directory(t / "a-directory");
  }

  // The slow inputs (the 100 MB file, the synthetic records and their broken
  // copies) are made the first time a case names one: ctest runs every case in
  // a process of its own (docs/performance.md, "Build time"). False when they
  // could not be written.
  static bool make_inputs_named_by(const std::vector<std::string>& args) {
    const fs::path t(tmp_);
    auto named = [&](std::initializer_list<const char*> files) {
      for (const auto& a : args) {
        for (const char* f : files) {
          if (a.find((t / f).string()) != std::string::npos) return true;
        }
      }
      return false;
    };
    if (!junk_made_ && named({"junk-100MB.toml", "junk-100MB.hea", "junk-100MB.csv"})) {
      write_junk(t / "junk-100MB.toml", 100u << 20);
      fs::create_symlink(t / "junk-100MB.toml", t / "junk-100MB.hea");
      fs::create_symlink(t / "junk-100MB.toml", t / "junk-100MB.csv");
      junk_made_ = true;
    }
    if (!records_made_ && named({"ok.edf", "ok.csv", "truncated.edf", "header-only.edf"})) {
      // A valid EDF and CSV from the synthetic generator, then broken copies.
      const auto edf =
          run_cli({"wave", "synth", "-o", (t / "ok.edf").string(), "--duration", "30s"});
      const auto csv =
          run_cli({"wave", "synth", "-o", (t / "ok.csv").string(), "--duration", "30s"});
      records_ok_ = edf.exit_code == 0 && csv.exit_code == 0;
      const std::string whole = read_all(t / "ok.edf");
      write(t / "truncated.edf", whole.substr(0, whole.size() / 2));
      write(t / "header-only.edf", whole.substr(0, 200));
      records_made_ = true;
    }
    return !records_made_ || records_ok_;
  }
  static void TearDownTestSuite() { fs::remove_all(tmp_); }

 protected:
  static std::string tmp_;
  static bool junk_made_, records_made_, records_ok_;
};
std::string Catalogue::tmp_;
bool Catalogue::junk_made_ = false;
bool Catalogue::records_made_ = false;
bool Catalogue::records_ok_ = false;

std::string substitute(std::string a, const std::string& tmp) {
  for (const auto& [key, value] : std::map<std::string, std::string>{
           {"{cases}", cases_dir()}, {"{tmp}", tmp}, {"{shared}", shared_data_dir()}}) {
    for (auto at = a.find(key); at != std::string::npos; at = a.find(key, at + value.size())) {
      a.replace(at, key.size(), value);
    }
  }
  return a;
}

std::uint64_t fnv1a(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::uint64_t h = 14695981039346656037ull;
  std::vector<char> block(1 << 20);
  while (in) {
    in.read(block.data(), static_cast<std::streamsize>(block.size()));
    for (std::streamsize i = 0; i < in.gcount(); ++i) {
      h = (h ^ static_cast<unsigned char>(block[static_cast<std::size_t>(i)])) * 1099511628211ull;
    }
  }
  return h;
}

// The inputs of a case: every existing file it names, and for a file in the
// cases folder every file there (a header names its .dat).
std::map<std::string, std::uint64_t> hashes(const std::vector<std::string>& args) {
  std::map<std::string, std::uint64_t> out;
  std::error_code ec;
  for (const auto& a : args) {
    if (!fs::is_regular_file(a, ec)) continue;
    out[a] = fnv1a(a);
    if (fs::path(a).parent_path() == fs::path(cases_dir())) {
      for (const auto& e : fs::directory_iterator(cases_dir()))
        out[e.path().string()] = fnv1a(e.path());
    }
  }
  return out;
}

// run_cli with a time limit: a hang is a failure (exit code -1), not a stuck test.
CliResult run_with_limit(const std::vector<std::string>& args, int seconds) {
  const std::string dir = temp_dir("bad_input_run");
  const std::string out_path = dir + "/stdout", err_path = dir + "/stderr";
  const pid_t pid = fork();
  if (pid == 0) {
    if (!freopen("/dev/null", "rb", stdin) || !freopen(out_path.c_str(), "wb", stdout) ||
        !freopen(err_path.c_str(), "wb", stderr)) {
      _exit(127);
    }
    std::vector<std::string> copy = args;
    std::string exe = BREATHBEAT_EXE;
    std::vector<char*> argv{exe.data()};
    for (auto& a : copy) argv.push_back(a.data());
    argv.push_back(nullptr);
    execv(exe.c_str(), argv.data());
    _exit(127);
  }
  CliResult r;
  int status = 0;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(seconds);
  for (;;) {
    if (waitpid(pid, &status, WNOHANG) == pid) {
      r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
      break;
    }
    if (std::chrono::steady_clock::now() > deadline) {
      kill(pid, SIGKILL);
      waitpid(pid, &status, 0);
      r.exit_code = -1;
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
  }
  r.out = read_all(out_path);
  r.err = read_all(err_path);
  fs::remove_all(dir);
  return r;
}

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

TEST_P(Catalogue, ExitsTwoNamesThePlaceAndLeavesInputsAlone) {
  const Case& c = GetParam();
  ASSERT_FALSE(c.args.empty()) << "manifest.txt line " << c.line << " is malformed";
  std::vector<std::string> args;
  bool needs_shared = false;
  for (const auto& a : c.args) {
    needs_shared = needs_shared || a.find("{shared}") != std::string::npos;
    args.push_back(substitute(a, tmp_));
  }
  if (needs_shared && !fs::exists(shared_data_dir())) GTEST_SKIP() << "no shared records";
  ASSERT_TRUE(make_inputs_named_by(args)) << "the generated EDF/CSV inputs could not be written";
  const auto before = hashes(args);
  // Time limit: common practice, no source (a bad input is refused at once;
  // 60 s leaves room for the 100 MB file on a loaded machine).
  const CliResult r = run_with_limit(args, 60);
  SCOPED_TRACE("case " + c.id + " (" + c.kind + "), manifest.txt line " + std::to_string(c.line));
  EXPECT_NE(r.exit_code, -1) << "timed out (hang)";
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_EQ(r.out, "") << "stdout must stay empty";
  const std::string err = lower(r.err);
  for (const auto& w : c.words) {
    EXPECT_NE(err.find(lower(w)), std::string::npos) << "stderr lacks '" << w << "':\n" << r.err;
  }
  EXPECT_EQ(hashes(args), before) << "an input changed";
}

INSTANTIATE_TEST_SUITE_P(BadInput, Catalogue, ::testing::ValuesIn(read_manifest()),
                         [](const ::testing::TestParamInfo<Case>& info) {
                           std::string name = info.param.id;
                           for (char& ch : name) {
                             if (!std::isalnum(static_cast<unsigned char>(ch))) ch = '_';
                           }
                           return name;
                         });

// The catalogue covers what issue 11 lists, class by class (a case removed
// from the manifest by mistake shows here).
TEST(CatalogueManifest, CoversEveryClass) {
  std::map<std::string, int> count;
  for (const auto& c : read_manifest()) ++count[c.kind];
  for (const char* kind :
       {"malformed-toml", "unknown-key", "wrong-dimension", "out-of-range", "contradiction",
        "bad-number", "empty", "path", "uncalibrated", "wfdb-header", "truncated", "edf", "csv",
        "stretch", "every-problem", "site-thresholds"}) {
    EXPECT_GT(count[kind], 0) << kind;
  }
}

}  // namespace
}  // namespace bb::test
