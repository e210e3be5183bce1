// breathbeat wave end to end for issue 13 items 5, 6 and 10: the conditions the
// signals cannot show (stated with the names of calc ppv), arterial pressure
// alone (PPV over cycles of a set rate or of the modulation found in the pulse
// pressure), and progress on stderr only when stderr is a terminal.
#include <fcntl.h>
#include <gtest/gtest.h>
#include <pty.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

#include "cli_runner.hpp"

namespace bb::wave {
namespace {

namespace fs = std::filesystem;
using bb::test::parse_json;
using bb::test::run_cli;

// A synthetic record with known truth (HR 96/min, RR 16/min, PPV 14 %, VT 450 mL,
// elastance 25 cmH2O/L: `wave synth`), and the same record with its airway
// pressure and flow channels dropped (`wave convert --channels ABP`).
struct Records {
  fs::path full, abp;
};
Records synth(const std::string& name, const std::vector<std::string>& extra = {}) {
  const fs::path dir = bb::test::temp_dir(name);
  Records r{dir / "full.csv", dir / "abp.csv"};
  std::vector<std::string> args{
      "wave", "synth", "-o", r.full.string(), "--duration", "3min", "--hr",
      "96",   "--rr",  "16", "--ppv",         "14",         "--vt", "450"};
  args.insert(args.end(), extra.begin(), extra.end());
  const auto made = run_cli(args);
  EXPECT_EQ(made.exit_code, 0) << made.err;
  const auto cut = run_cli({"wave", "convert", r.full.string(), "-o", r.abp.string(), "--format",
                            "csv", "--channels", "ABP"});
  EXPECT_EQ(cut.exit_code, 0) << cut.err;
  return r;
}

const nlohmann::json& gate(const nlohmann::json& j, const std::string& key) {
  for (const auto& g : j["gates"]) {
    if (g["key"] == key) return g;
  }
  static const nlohmann::json none;
  ADD_FAILURE() << "no gate " << key;
  return none;
}

double result(const nlohmann::json& j, const std::string& key) {
  if (!j["results"].contains(key)) {
    ADD_FAILURE() << "no result " << key;
    return NAN;
  }
  return j["results"][key]["value"].get<double>();
}

TEST(WaveArterialAlone, PpvFromTheModulationFoundInThePulsePressure) {
  const Records rec = synth("wave_abp_modulation");
  const auto r = run_cli({"wave", rec.abp.string(), "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;  // no longer refused
  const nlohmann::json j = parse_json(r);
  EXPECT_EQ(j["cycles"], "pulse_modulation");
  EXPECT_NEAR(j["heart_rate"]["value"].get<double>(), 96, 0.5);        // synthetic truth
  EXPECT_NEAR(j["respiratory_rate"]["value"].get<double>(), 16, 0.5);  // synthetic truth
  ASSERT_TRUE(j["ppv"].is_object());
  EXPECT_NEAR(j["ppv"]["value"].get<double>(), 14, 1.0);  // synthetic truth, within 1 point
  // 180 s at 16/min: 48 cycles, whole cycles per 30 s window only (8 per window; 7 when
  // the rate found is a little under 16/min).
  EXPECT_NEAR(j["cycles_analysed"].get<int>(), 48, 6);
  EXPECT_NEAR(result(j, "pulse_pressure"), 40, 15);  // beats always given
  // What arterial pressure cannot show stays unknown; a rate found in the pulse
  // pressure can fail HR/RR but not prove it.
  EXPECT_EQ(gate(j, "passive_ventilation")["state"], "unknown");
  EXPECT_EQ(gate(j, "compliance")["state"], "unknown");
  EXPECT_EQ(gate(j, "hr_rr_ratio")["state"], "not_contradicted");
  ASSERT_TRUE(j["reading"].is_object());
  EXPECT_TRUE(j["reading"]["conditional"].get<bool>());
  // Said first: the unknown conditions lead the reading's text.
  const std::string text = j["reading"]["text"];
  EXPECT_EQ(text.rfind("Conditional on", 0), 0u) << text;
  bool named = false;
  for (const auto& n : j["notes"]) {
    const std::string s = n;
    if (s.find("Lomb-Scargle") != std::string::npos && s.find("Aboy") != std::string::npos)
      named = true;
  }
  EXPECT_TRUE(named) << j["notes"];
  for (const auto& w : j["windows"]) {
    EXPECT_EQ(w["cycles"], "pulse_modulation");
    ASSERT_TRUE(w["modulation"].is_object());
    EXPECT_LT(w["modulation"]["false_alarm"].get<double>(), 0.01);  // Scargle 1982 level, 1 %
  }
  // Beats and the text answer: the breath channel is said to be absent.
  const auto t = run_cli({"wave", rec.abp.string()});
  ASSERT_EQ(t.exit_code, 0) << t.err;
  EXPECT_NE(t.out.find("none (arterial pressure alone)"), std::string::npos) << t.out;
  // The trend counts cycles, not breaths, and marks the rate found as an estimate ("~").
  EXPECT_NE(t.out.find("rej   cycles  HR/min"), std::string::npos) << t.out;
  EXPECT_NE(t.out.find("   ~1"), std::string::npos) << t.out;
  EXPECT_NE(t.out.find("never a substitute"), std::string::npos);
}

TEST(WaveArterialAlone, PpvOverWholeCyclesOfTheSetRate) {
  const Records rec = synth("wave_abp_set_rate");
  const auto r = run_cli({"wave", rec.abp.string(), "--rr", "16", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  EXPECT_EQ(j["cycles"], "set_rate");
  EXPECT_NEAR(j["respiratory_rate"]["value"].get<double>(), 16, 1e-9);  // as set
  EXPECT_NEAR(j["ppv"]["value"].get<double>(), 14, 1.0);  // synthetic truth, within 1 point
  EXPECT_EQ(j["cycles_analysed"].get<int>(), 48);         // 180 s / (60/16 s)
  // HR/RR 96/16 = 6 > 3.6 (De Backer et al., Anesthesiology 2009;110:1092), rate stated.
  EXPECT_EQ(gate(j, "hr_rr_ratio")["state"], "met");
  EXPECT_EQ(j["windows_rate_mismatch"].get<int>(), 0);  // the pulse pressure agrees with 16/min
  // A rate typed that is not the one the pulse pressure shows (12 against the true 16/min):
  // every window says so.
  const auto wrong = run_cli({"wave", rec.abp.string(), "--rr", "12", "--format", "json"});
  ASSERT_EQ(wrong.exit_code, 0) << wrong.err;
  const nlohmann::json wj = parse_json(wrong);
  EXPECT_EQ(wj["windows_rate_mismatch"].get<int>(), 6);  // 180 s in 30 s windows
  EXPECT_NE(wj["notes"].dump().find("modulated at another rate"), std::string::npos) << wj["notes"];
  // The same record with its airway channel: the set rate is not used, the breaths are.
  const auto full = run_cli({"wave", rec.full.string(), "--rr", "12", "--format", "json"});
  ASSERT_EQ(full.exit_code, 0) << full.err;
  const nlohmann::json f = parse_json(full);
  EXPECT_EQ(f["cycles"], "breaths");
  EXPECT_NEAR(f["respiratory_rate"]["value"].get<double>(), 16, 0.2);  // synthetic truth
  EXPECT_NE(f["notes"].dump().find("was not used"), std::string::npos) << f["notes"];
}

TEST(WaveConditions, StatedConditionsAreKnownAndVtPerKgComesFromFlow) {
  const Records rec = synth("wave_conditions");
  const auto r =
      run_cli({"wave", rec.full.string(), "--passive", "--regular", "--closed-chest", "--no-iah",
               "--no-rv-failure", "--sex", "male", "--height", "175cm", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  for (const char* key : {"passive_ventilation", "regular_rhythm", "closed_chest",
                          "no_intra_abdominal_hypertension", "no_rv_failure"}) {
    EXPECT_EQ(gate(j, key)["state"], "met") << key;
  }
  // PBW = 50 + 0.91 (175 - 152.4) = 70.57 kg (ARDS Network, NEJM 2000;342:1301);
  // VT 450 mL (synthetic truth) / 70.57 kg = 6.4 mL/kg, below 8 mL/kg (De Backer et al.,
  // Intensive Care Med 2005;31:517): a low VT can make PPV falsely low, so a high PPV
  // keeps its meaning (docs/methods.md, "Directional validity conditions").
  EXPECT_NEAR(result(j, "vt_per_kg"), 450.0 / 70.566, 0.1);
  EXPECT_EQ(gate(j, "vt_per_kg_pbw")["state"], "failed");
  ASSERT_TRUE(j["reading"].is_object());
  EXPECT_EQ(j["reading"]["category"], "above_grey_zone");
  EXPECT_FALSE(j["reading"]["conditional"].get<bool>()) << j["reading"];

  // Effort stated: PPV cannot be read either way (bias.ppv.passive_ventilation: Heenen et
  // al., Crit Care 2006;10:R102, from memory).
  const auto e = run_cli({"wave", rec.full.string(), "--effort", "--format", "json"});
  ASSERT_EQ(e.exit_code, 0) << e.err;
  const nlohmann::json ej = parse_json(e);
  EXPECT_EQ(gate(ej, "passive_ventilation")["state"], "failed");
  EXPECT_EQ(ej["reading"]["category"], "not_interpretable");

  // Nothing stated: the signals alone leave "passive" only not contradicted.
  const auto n = run_cli({"wave", rec.full.string(), "--format", "json"});
  ASSERT_EQ(n.exit_code, 0) << n.err;
  const nlohmann::json nj = parse_json(n);
  EXPECT_EQ(gate(nj, "passive_ventilation")["state"], "not_contradicted");
  EXPECT_EQ(gate(nj, "closed_chest")["state"], "unknown");
  EXPECT_EQ(gate(nj, "vt_per_kg_pbw")["state"], "unknown");
}

TEST(WaveConditions, ASignalFailureWinsOverAStatedRegularRhythm) {
  // 25 % premature beats: more than the 10 % of waveform.ectopic_share_max (common
  // practice, no source), so the signals show an irregular rhythm whatever is stated.
  const Records rec = synth("wave_conditions_ectopy", {"--ectopy", "25%"});
  const auto r = run_cli({"wave", rec.full.string(), "--regular", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  const nlohmann::json& g = gate(j, "regular_rhythm");
  EXPECT_EQ(g["state"], "failed");
  EXPECT_NE(g["detail"].get<std::string>().find("contradicted"), std::string::npos) << g;
}

// ---- progress (issue 13 item 10) -------------------------------------------------

TEST(WaveProgress, PipedStderrCarriesNoProgress) {
  const fs::path dir = bb::test::temp_dir("wave_progress_pipe");
  const fs::path rec = dir / "long.csv";
  ASSERT_EQ(run_cli({"wave", "synth", "-o", rec.string(), "--duration", "10min"}).exit_code, 0);
  const auto r = run_cli({"wave", rec.string()});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(r.err.empty()) << r.err;  // stderr is a pipe here: no progress, nothing else
}

// Runs breathbeat with stderr on a pseudo-terminal (stdout to /dev/null) and
// returns what the terminal received; `ci` sets CI=true in its environment.
std::string stderr_on_terminal(const std::vector<std::string>& args, bool ci) {
  int master = -1, slave = -1;
  if (openpty(&master, &slave, nullptr, nullptr, nullptr) != 0) return "openpty failed";
  const pid_t pid = fork();
  if (pid == 0) {
    close(master);
    dup2(slave, STDERR_FILENO);
    const int devnull = open("/dev/null", O_WRONLY);
    dup2(devnull, STDOUT_FILENO);
    if (ci)
      setenv("CI", "true", 1);
    else
      unsetenv("CI");
    std::string exe = BREATHBEAT_EXE;
    std::vector<std::string> copy = args;
    std::vector<char*> argv{exe.data()};
    for (std::string& a : copy) argv.push_back(a.data());
    argv.push_back(nullptr);
    execv(exe.c_str(), argv.data());
    _exit(127);
  }
  close(slave);
  std::string got;
  char buf[4096];
  for (;;) {
    const ssize_t n = read(master, buf, sizeof buf);
    if (n <= 0) break;  // EIO once the child has closed the terminal
    got.append(buf, static_cast<std::size_t>(n));
  }
  close(master);
  int status = 0;
  waitpid(pid, &status, 0);
  return got;
}

TEST(WaveProgress, ATerminalShowsProgressOnLongRecordsButNotInCi) {
  const fs::path dir = bb::test::temp_dir("wave_progress_tty");
  const fs::path rec = dir / "long.hea";
  ASSERT_EQ(run_cli({"wave", "synth", "-o", rec.string(), "--duration", "10min"}).exit_code, 0);
  const std::string shown = stderr_on_terminal({"wave", rec.string()}, false);
  EXPECT_NE(shown.find("s of 600 s analysed"), std::string::npos) << shown;
  EXPECT_NE(shown.find("\r"), std::string::npos);  // one line, overwritten
  EXPECT_EQ(stderr_on_terminal({"wave", rec.string()}, true).find("analysed"), std::string::npos);
  // A short record (under three minutes) shows none.
  const fs::path short_rec = dir / "short.hea";
  ASSERT_EQ(run_cli({"wave", "synth", "-o", short_rec.string(), "--duration", "2min"}).exit_code,
            0);
  EXPECT_EQ(stderr_on_terminal({"wave", short_rec.string()}, false).find("analysed"),
            std::string::npos);
}

}  // namespace
}  // namespace bb::wave
