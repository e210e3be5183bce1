// The JSON report conforms to docs/report.schema.json. The python jsonschema
// module is not installed, so this file carries a small validator for the
// keywords the schema uses: type, enum, required, properties,
// additionalProperties, items, minItems, anyOf and local $ref.
#include <gtest/gtest.h>

#include <fstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

class Validator {
 public:
  explicit Validator(json schema) : root_(std::move(schema)) {}

  std::vector<std::string> errors(const json& doc) {
    problems_.clear();
    check(doc, root_, "$");
    return problems_;
  }

 private:
  const json& resolve(const json& schema) const {
    if (!schema.contains("$ref")) return schema;
    const std::string ref = schema["$ref"];  // "#/$defs/name"
    return root_.at(json::json_pointer(ref.substr(1)));
  }

  static bool has_type(const json& v, const std::string& t) {
    if (t == "object") return v.is_object();
    if (t == "array") return v.is_array();
    if (t == "string") return v.is_string();
    if (t == "number") return v.is_number();
    if (t == "boolean") return v.is_boolean();
    if (t == "null") return v.is_null();
    return false;
  }

  bool valid(const json& v, const json& schema, const std::string& at) {
    const std::size_t before = problems_.size();
    check(v, schema, at);
    const bool ok = problems_.size() == before;
    problems_.resize(before);
    return ok;
  }

  void check(const json& v, const json& raw, const std::string& at) {
    const json& s = resolve(raw);
    if (raw.contains("minItems") && v.is_array() && v.size() < raw["minItems"].get<std::size_t>()) {
      problems_.push_back(at + ": too few items");
    }
    if (s.contains("type") && !has_type(v, s["type"])) {
      problems_.push_back(at + ": not of type " + s["type"].get<std::string>());
      return;
    }
    if (s.contains("enum") && std::find(s["enum"].begin(), s["enum"].end(), v) == s["enum"].end()) {
      problems_.push_back(at + ": " + v.dump() + " not in enum");
    }
    if (s.contains("anyOf")) {
      bool any = false;
      for (const auto& option : s["anyOf"]) any = any || valid(v, option, at);
      if (!any) problems_.push_back(at + ": matches no anyOf option");
    }
    if (s.contains("minItems") && v.is_array() && v.size() < s["minItems"].get<std::size_t>()) {
      problems_.push_back(at + ": too few items");
    }
    if (v.is_array() && s.contains("items")) {
      for (std::size_t i = 0; i < v.size(); ++i)
        check(v[i], s["items"], at + "[" + std::to_string(i) + "]");
    }
    if (!v.is_object()) return;
    if (s.contains("required")) {
      for (const auto& k : s["required"]) {
        if (!v.contains(k.get<std::string>()))
          problems_.push_back(at + ": missing " + k.get<std::string>());
      }
    }
    for (auto it = v.begin(); it != v.end(); ++it) {
      const std::string where = at + "." + it.key();
      if (s.contains("properties") && s["properties"].contains(it.key())) {
        check(it.value(), s["properties"][it.key()], where);
      } else if (s.contains("additionalProperties")) {
        const json& extra = s["additionalProperties"];
        if (extra.is_boolean() && !extra.get<bool>()) {
          problems_.push_back(where + ": not allowed");
        } else if (extra.is_object()) {
          check(it.value(), extra, where);
        }
      }
    }
  }

  json root_;
  std::vector<std::string> problems_;
};

json schema() {
  std::ifstream in(source_dir() + "/docs/report.schema.json");
  return json::parse(in);
}

TEST(ReportSchema, ValidatorRejectsBrokenDocuments) {
  Validator v(schema());
  json bad = {{"tool", "breathbeat"}};
  EXPECT_FALSE(v.errors(bad).empty());
  const CliResult r = run_cli({"demo", "--format", "json"});
  json doc = parse_json(r);
  doc["steps"][0]["mechanics"]["driving_pressure"] = {{"value", "15"},
                                                      {"unit", "cm[H2O]"}};  // a string number
  EXPECT_FALSE(v.errors(doc).empty());
}

TEST(ReportSchema, DemoReportConforms) {
  const CliResult r =
      run_cli({"report", source_dir() + "/presets/demo/trial.toml", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  Validator v(schema());
  const auto problems = v.errors(parse_json(r));
  for (const auto& p : problems) ADD_FAILURE() << p;
}

TEST(ReportSchema, EveryNumberCarriesAUcumUnit) {
  const json doc = parse_json(run_cli({"demo", "--format", "json"}));
  std::size_t numbers = 0;
  auto walk = [&](auto&& self, const json& v) -> void {
    if (v.is_object() && v.contains("value")) {
      ++numbers;
      EXPECT_TRUE(v.contains("unit") && v["unit"].is_string() &&
                  !v["unit"].get<std::string>().empty())
          << v.dump();
      return;
    }
    if (v.is_structured()) {
      for (const auto& x : v) self(self, x);
    }
  };
  walk(walk, doc);
  EXPECT_GT(numbers, 100u);
}

}  // namespace
}  // namespace bb::test
