// breathbeat demo runs the full report of the built-in invented trial; its key
// numbers are checked against the published formulas (sources beside each).
#include <gtest/gtest.h>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

const nlohmann::json* step(const nlohmann::json& j, const std::string& label) {
  for (const auto& s : j["steps"]) {
    if (s["label"] == label) return &s;
  }
  return nullptr;
}

TEST(Demo, TextReportHasEverySectionAndFits100Columns) {
  const CliResult r = run_cli({"demo"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  for (const char* section :
       {"\nSettings\n", "\nMechanics\n", "\nGas exchange and O2 transport\n", "\nCirculation\n",
        "\nPreload\n", "\nHeart-lung estimate\n", "\nComparison\n", "\nCautions\n"}) {
    EXPECT_NE(r.out.find(section), std::string::npos) << section;
  }
  std::size_t start = 0;
  while (start < r.out.size()) {
    const std::size_t end = r.out.find('\n', start);
    const std::string line = r.out.substr(start, end - start);
    EXPECT_LE(line.size(), 100u) << line;
    start = end == std::string::npos ? r.out.size() : end + 1;
  }
}

TEST(Demo, ALimitComparisonPrintsTheDigitsThatDecide) {
  // 565 mL / PBW 70.566 kg = 8.007 mL/kg (ARDS Network, NEJM 2000;342:1301 PBW): above the
  // 8.0 mL/kg limit, so it is printed with the digit that shows why, never "8.0 is above 8.0".
  const CliResult r = run_cli({"demo"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("VT 8.01 mL/kg PBW is above 8.0 mL/kg PBW"), std::string::npos);
  EXPECT_EQ(r.out.find("VT 8.0 mL/kg PBW is above 8.0"), std::string::npos);
}

TEST(Demo, KeyNumbersFollowTheFormulas) {
  const CliResult r = run_cli({"demo", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  ASSERT_EQ(j["steps"].size(), 5u);
  // PBW male 175 cm = 50 + 0.91 (175 - 152.4) = 70.566 kg (ARDS Network, NEJM 2000;342:1301).
  EXPECT_NEAR(j["patient"]["values"]["pbw"]["value"].get<double>(), 70.566, 1e-3);

  const nlohmann::json* peep6 = step(j, "PEEP 6");
  ASSERT_NE(peep6, nullptr);
  // dP = 22 - 7 = 15 cmH2O (Amato et al., NEJM 2015;372:747); Crs = 420/15 = 28 mL/cmH2O
  // (textbook).
  EXPECT_NEAR((*peep6)["mechanics"]["driving_pressure"]["value"].get<double>(), 15.0, 1e-9);
  EXPECT_NEAR((*peep6)["mechanics"]["compliance_static"]["value"].get<double>(), 28.0, 1e-6);
  // CaO2 = 1.34 x 9.8 x 0.91 + 0.003 x 68 = 12.154 mL/dL; DO2 = 5.6 x 12.154 x 10 = 680.6 mL/min
  // (Marino, The ICU Book, from memory; k = 1.34 preset).
  EXPECT_NEAR((*peep6)["gas_exchange"]["do2"]["value"].get<double>(),
              5.6 * (1.34 * 9.8 * 0.91 + 0.003 * 68) * 10, 0.05);

  const nlohmann::json* peep18 = step(j, "PEEP 18");
  ASSERT_NE(peep18, nullptr);
  // P/F = 138 / 0.60 = 230 mmHg (ARDS Definition Task Force, JAMA 2012;307:2526).
  EXPECT_NEAR((*peep18)["gas_exchange"]["pf_ratio"]["value"].get<double>(), 230.0, 1e-6);

  // CO at PEEP 18 against PEEP 6: (4.3 - 5.6)/5.6 = -23.2 %, flagged at a 10 % fall (common
  // practice, no source).
  bool co_cost = false, trade_off = false;
  for (const auto& f : j["comparison"]) {
    if (f["key"] == "haemodynamic_cost" && f["steps"][0] == "PEEP 18" &&
        f["values"].contains("co_change")) {
      co_cost = true;
      EXPECT_NEAR(f["values"]["co_change"]["value"].get<double>(), (4.3 - 5.6) / 5.6 * 100.0, 1e-2);
    }
    if (f["key"] == "trade_off") {
      trade_off = true;
      EXPECT_EQ(f["steps"][0], "PEEP 18");
    }
    if (f["key"] == "vt_challenge") {
      // PPV (Michard 2000): PEEP 14 mean of 6/47, 6/46, 6/48 = 12.770 %; VT 8 mean of 9/47.5,
      // 9/46.5, 9/48.5 = 18.953 %; change 6.18 points >= 3.5 -> responsive (Myatra et al., CCM
      // 2017;45:415).
      const double lo = (6 / 47.0 + 6 / 46.0 + 6 / 48.0) / 3 * 100;
      const double hi = (9 / 47.5 + 9 / 46.5 + 9 / 48.5) / 3 * 100;
      EXPECT_NEAR(f["values"]["ppv_change"]["value"].get<double>(), hi - lo, 1e-2);
      EXPECT_TRUE(f["flagged"].get<bool>());
    }
  }
  EXPECT_TRUE(co_cost);
  EXPECT_TRUE(trade_off);
  EXPECT_EQ(step(j, "PEEP 14 VT 8")->at("preload")["statement"]["category"], "likely_responsive");
  EXPECT_EQ((*peep6)["preload"]["statement"]["category"], "not_assessable");
  EXPECT_FALSE(j["cautions"].empty());
}

}  // namespace
}  // namespace bb::test
