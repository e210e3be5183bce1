// breathbeat calc echo, end to end.
#include <gtest/gtest.h>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

TEST(CalcEcho, StrokeVolumeOutputAndIndex) {
  const CliResult r =
      run_cli({"calc", "echo", "--lvot", "2.0", "--vti", "20", "--hr", "80", "--height", "170",
               "--weight", "70", "--bsa-formula", "mosteller", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  const auto& res = j["results"];
  // Hand-worked on Quinones et al., JASE 2002;15:167: SV = 20 x pi x 1.0^2 = 62.83 mL,
  // CO = 62.83 x 80 = 5.03 L/min; CI with Mosteller BSA 1.818 m2 (Mosteller, NEJM 1987)
  // = 2.76 L/min/m2.
  EXPECT_NEAR(res["stroke_volume"]["value"].get<double>(), 62.83, 0.005);
  EXPECT_EQ(res["stroke_volume"]["unit"], "mL");
  EXPECT_NEAR(res["cardiac_output"]["value"].get<double>(), 5.03, 0.005);
  EXPECT_EQ(res["cardiac_output"]["unit"], "L/min");
  EXPECT_NEAR(res["cardiac_index"]["value"].get<double>(), 2.76, 0.005);
  EXPECT_EQ(res["cardiac_index"]["unit"], "L/min/m2");
  EXPECT_FALSE(j["cautions"].empty());
}

TEST(CalcEcho, MillimetresAndCentimetresAgree) {
  const auto a = parse_json(run_cli({"calc", "echo", "--lvot", "2.1", "--vti", "18", "--json"}));
  const auto b =
      parse_json(run_cli({"calc", "echo", "--lvot", "21mm", "--vti", "180mm", "--json"}));
  EXPECT_EQ(a["results"], b["results"]);
  // 18 x pi x 1.05^2 = 62.34 mL (Quinones et al., JASE 2002;15:167, hand-worked).
  EXPECT_NEAR(a["results"]["stroke_volume"]["value"].get<double>(), 62.34, 0.005);
}

TEST(CalcEcho, NegativeVtiExitsTwoNamingTheField) {
  const CliResult r = run_cli({"calc", "echo", "--lvot", "2.0", "--vti", "-20"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("vti"), std::string::npos) << r.err;
}

TEST(CalcEcho, ZeroWeightExitsTwo) {
  const CliResult r = run_cli({"calc", "echo", "--lvot", "2.0", "--vti", "20", "--hr", "80",
                               "--height", "170", "--weight", "0", "--allow-implausible"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("weight"), std::string::npos) << r.err;
}

}  // namespace
}  // namespace bb::test
