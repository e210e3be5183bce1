// Reading a trial file: TOML through toml++, every value through
// parse_quantity, every problem collected with its file:line:column.
#include "breathbeat/trial/trial_file.hpp"

#include <toml++/toml.h>
#include <cstdio>
#include <fstream>
#include <set>
#include <sstream>

#include "breathbeat/trial/analysis.hpp"
#include "trial_echo.hpp"

namespace bb {

namespace {

SourcePlace place_of(const toml::node& node, const std::string& file) {
  const auto& b = node.source().begin;
  return SourcePlace{file, static_cast<int>(b.line), static_cast<int>(b.column)};
}

std::string number_text(double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.15g", v);
  return buf;
}

// The text of a scalar node as the user wrote it ("28", "2.8 kPa").
std::optional<std::string> scalar_text(const toml::node& node) {
  if (auto s = node.value<std::string>(); s && node.is_string()) return *s;
  if (node.is_integer()) return std::to_string(*node.value<int64_t>());
  if (node.is_floating_point()) return number_text(*node.value<double>());
  return std::nullopt;
}

std::string node_kind(const toml::node& node) {
  if (node.is_table()) return "a table";
  if (node.is_array()) return "an array";
  if (node.is_boolean()) return "a true/false value";
  if (node.is_string()) return "text";
  if (node.is_number()) return "a number";
  return "a date or time";
}

// Everything one read needs: the file name, the collected problems and the limits.
struct Context {
  std::string file;
  std::vector<InputError> errors;
  const Thresholds* limits = nullptr;

  void add(InputError e, const toml::node& node) { errors.push_back(e.at(place_of(node, file))); }
  void add(InputError e) { errors.push_back(std::move(e)); }
};

// Reads the keys of one table; every key it is asked about counts as known, and
// finish() reports the rest as unknown with a did-you-mean.
class TableReader {
 public:
  TableReader(Context& cx, const toml::table& table, std::string path,
              std::map<std::string, SourcePlace>* places = nullptr, std::string place_prefix = "")
      : cx_(cx),
        table_(table),
        path_(std::move(path)),
        places_(places),
        prefix_(std::move(place_prefix)) {}

  const std::string& path() const { return path_; }
  std::string field(std::string_view key) const { return path_ + "." + std::string(key); }

  const toml::node* raw(std::string_view key) {
    known_.emplace_back(key);
    const toml::node* node = table_.get(key);
    if (node && places_) (*places_)[prefix_ + std::string(key)] = place_of(*node, cx_.file);
    return node;
  }

  // A quantity written as a number (default unit) or text with a unit; checked
  // against its plausible range (`plausibility`, default the key itself).
  template <class Q>
  void quantity(std::string_view key, std::string_view default_unit, std::optional<Q>& out,
                std::string_view plausibility = {}) {
    const toml::node* node = raw(key);
    if (!node) return;
    const std::string name = field(key);
    const auto text = scalar_text(*node);
    if (!text) {
      cx_.add(
          InputError(name, "", "is " + node_kind(*node),
                     "a number or text with a unit, e.g. \"10 " + std::string(default_unit) + "\""),
          *node);
      return;
    }
    try {
      const Q value = parse_quantity<Q>(*text, Field{name, default_unit});
      cx_.limits->check_plausible(plausibility.empty() ? key : plausibility, value);
      out = value;
    } catch (const InputError& e) {
      cx_.add(InputError(name, e.value().empty() ? *text : e.value(), e.problem(), e.expected()),
              *node);
    }
  }

  void boolean(std::string_view key, std::optional<bool>& out) {
    const toml::node* node = raw(key);
    if (!node) return;
    if (node->is_boolean()) {
      out = *node->value<bool>();
      return;
    }
    const auto text = scalar_text(*node);
    if (text && (*text == "yes" || *text == "no")) {
      out = *text == "yes";
      return;
    }
    cx_.add(InputError(field(key), text.value_or(""), "is not a yes/no value", "true or false"),
            *node);
  }

  void text(std::string_view key, std::optional<std::string>& out) {
    const toml::node* node = raw(key);
    if (!node) return;
    if (auto t = scalar_text(*node)) {
      out = *t;
      return;
    }
    if (node->is_time() || node->is_date_time() || node->is_date()) {
      std::ostringstream s;
      if (node->is_time()) s << *node->value<toml::time>();
      if (node->is_date()) s << *node->value<toml::date>();
      if (node->is_date_time()) s << *node->value<toml::date_time>();
      out = s.str();
      return;
    }
    cx_.add(InputError(field(key), "", "is " + node_kind(*node), "text in quotes"), *node);
  }

  template <class E>
  void choice(std::string_view key, const std::vector<std::pair<std::string, E>>& words,
              std::optional<E>& out) {
    std::optional<std::string> word;
    text(key, word);
    if (!word) return;
    std::string allowed;
    for (const auto& [w, e] : words) {
      if (w == *word) {
        out = e;
        return;
      }
      allowed += (allowed.empty() ? "" : " or ") + w;
    }
    cx_.add(InputError(field(key), *word, "is not a recognised choice", allowed), *table_.get(key));
  }

  const toml::table* table(std::string_view key) {
    const toml::node* node = raw(key);
    if (!node) return nullptr;
    if (const toml::table* t = node->as_table()) return t;
    cx_.add(InputError(field(key), "", "is " + node_kind(*node), "a table [" + field(key) + "]"),
            *node);
    return nullptr;
  }

  void required(std::string_view key, const std::string& expected) {
    if (!table_.contains(key)) {
      cx_.add(InputError(field(key), "", "is missing", expected), table_);
    }
  }

  void finish() {
    for (const auto& [k, node] : table_) {
      const std::string key(k.str());
      if (std::find(known_.begin(), known_.end(), key) != known_.end()) continue;
      std::string expected = "one of the fields of [" + path_ + "] (docs/trial-file.md)";
      if (auto near = closest_match(key, known_)) expected = "'" + *near + "' (did you mean it?)";
      cx_.add(InputError(field(key), "", "is not a known field", expected), node);
    }
  }

 private:
  Context& cx_;
  const toml::table& table_;
  std::string path_;
  std::map<std::string, SourcePlace>* places_;
  std::string prefix_;
  std::vector<std::string> known_;
};

// ---- the patient ------------------------------------------------------------

void read_patient(Context& cx, const toml::table& table, TrialPatient& p) {
  TableReader r(cx, table, "patient");
  r.required("sex", "sex = \"male\" or \"female\" (for predicted body weight)");
  r.required("height", "height = \"170 cm\"");
  r.choice<Sex>("sex", {{"male", Sex::male}, {"female", Sex::female}}, p.sex);
  r.quantity("height", "cm", p.height);
  r.quantity("weight", "kg", p.weight);
  std::optional<std::string> age;
  r.text("age", age);
  if (age) {
    try {
      const double years = parse_number(*age, Field{r.field("age"), ""});
      cx.limits->check_plausible_si("age", years, Dimension::number);
      p.age_years = years;
    } catch (const InputError& e) {
      cx.add(InputError(r.field("age"), *age, e.problem(), e.expected()), *table.get("age"));
    }
  }
  std::optional<std::string> label;
  r.text("label", label);
  p.label = label.value_or("");
  r.finish();
}

// ---- the sub-tables of a step -------------------------------------------------

void read_ventilator(TableReader& r, TrialVentilator& v, Context& cx, const toml::table& table) {
  r.choice<VentMode>("mode", {{"vc", VentMode::volume_control}, {"pc", VentMode::pressure_control}},
                     v.mode);
  r.quantity("set_peep", "cmH2O", v.set_peep);
  r.quantity("vt", "mL", v.vt);
  r.quantity("pinsp", "cmH2O", v.pinsp);
  r.quantity("rr", "/min", v.rr);
  r.quantity("ti", "s", v.ti);
  std::optional<std::string> ie;
  r.text("ie", ie);
  if (ie) {
    const auto colon = ie->find(':');
    try {
      if (colon == std::string::npos) throw InputError("", "", "", "");
      const double i = parse_number(ie->substr(0, colon), Field{r.field("ie"), ""});
      const double e = parse_number(ie->substr(colon + 1), Field{r.field("ie"), ""});
      if (i <= 0 || e <= 0) throw InputError("", "", "", "");
      v.ie_expiratory = e / i;
    } catch (const InputError&) {
      cx.add(InputError(r.field("ie"), *ie, "is not an I:E ratio", "text like \"1:2\""),
             *table.get("ie"));
    }
  }
  r.quantity("fio2", "%", v.fio2);
  r.quantity("flow", "L/min", v.flow);
}

void read_hold(TableReader& r, TrialHold& h) {
  r.quantity("ppeak", "cmH2O", h.ppeak);
  r.quantity("pplat", "cmH2O", h.pplat);
  r.quantity("peep_total", "cmH2O", h.peep_total, "peep");
  r.quantity("pes_ee", "cmH2O", h.pes_ee);
  r.quantity("pes_ei", "cmH2O", h.pes_ei);
}

void read_gases(TableReader& r, TrialGases& g) {
  r.quantity("pao2", "mmHg", g.pao2);
  r.quantity("paco2", "mmHg", g.paco2);
  r.quantity("sao2", "%", g.sao2);
  r.quantity("spo2", "%", g.spo2);
  r.quantity("svo2", "%", g.svo2);
  r.quantity("scvo2", "%", g.scvo2, "svo2");
  r.quantity("pvo2", "mmHg", g.pvo2);
  r.quantity("hb", "g/dL", g.hb);
  r.quantity("lactate", "mmol/L", g.lactate);
}

void read_circulation(TableReader& r, TrialCirculation& c, Context& cx, const toml::table& table) {
  r.quantity("hr", "/min", c.hr);
  r.boolean("rhythm_regular", c.rhythm_regular);
  r.quantity("sbp", "mmHg", c.sbp);
  r.quantity("dbp", "mmHg", c.dbp);
  r.quantity("map", "mmHg", c.map);
  r.quantity("cvp", "mmHg", c.cvp);
  r.quantity("pmsf", "mmHg", c.pmsf);
  r.quantity("co", "L/min", c.co);
  r.text("co_method", c.co_method);
  std::optional<std::string> cycles;
  r.text("pp_cycles", cycles);
  if (cycles) {
    try {
      c.pp_cycles = parse_pulse_pressure_cycles(*cycles, r.field("pp_cycles"), "mmHg");
      for (const auto& b : c.pp_cycles) {
        cx.limits->check_plausible("pulse_pressure", b.pp_max);
        cx.limits->check_plausible("pulse_pressure", b.pp_min);
      }
    } catch (const InputError& e) {
      cx.add(InputError(r.field("pp_cycles"), e.value(), e.problem(), e.expected()),
             *table.get("pp_cycles"));
      c.pp_cycles.clear();
    }
  }
  r.quantity("ppv", "%", c.ppv_monitor);
  r.quantity("svv", "%", c.svv);
  r.boolean("spontaneous_effort", c.spontaneous_effort);
  r.boolean("chest_open", c.chest_open);
  r.boolean("intra_abdominal_hypertension", c.intra_abdominal_hypertension);
  r.boolean("rv_failure", c.rv_failure);
}

void read_ultrasound(TableReader& r, TrialUltrasound& u) {
  r.quantity("ivc_dmax", "cm", u.ivc_dmax, "dmax");
  r.quantity("ivc_dmin", "cm", u.ivc_dmin, "dmin");
  r.choice<Breathing>("ivc_breathing",
                      {{"passive", Breathing::passive}, {"spontaneous", Breathing::spontaneous}},
                      u.ivc_breathing);
  r.quantity("lvot_diameter", "cm", u.lvot_diameter, "lvot");
  r.quantity("vti", "cm", u.vti);
}

// The infusion module's reading of one [[step.infusion]]; problems are collected.
std::optional<InfusionInput> parse_infusion(Context& cx, TableReader& r, const toml::table& table,
                                            const TrialInfusion& inf) {
  if (inf.drug.empty()) return std::nullopt;
  InfusionInput in;
  auto attempt = [&](const char* key, auto&& parse) {
    try {
      parse();
      return true;
    } catch (const InputError& e) {
      const toml::node* node = table.get(key);
      cx.add(InputError(r.field(key), e.value(), e.problem(), e.expected()), node ? *node : table);
      return false;
    }
  };
  if (!attempt("drug", [&] { in.drug = parse_drug(inf.drug, Field{r.field("drug"), ""}); }))
    return std::nullopt;
  const DoseBasis basis = drug_info(in.drug).basis;
  bool ok = true;
  if (inf.rate)
    ok &= attempt("rate", [&] {
      in.rate = parse_infusion_rate(*inf.rate, Field{r.field("rate"), "mL/h"});
    });
  if (inf.concentration) {
    ok &= attempt("concentration", [&] {
      in.conc =
          parse_drug_concentration(*inf.concentration, basis, Field{r.field("concentration"), ""});
    });
  }
  if (inf.dose)
    ok &= attempt("dose", [&] {
      in.dose = parse_drug_dose(*inf.dose, basis, Field{r.field("dose"), ""});
    });
  if (!ok) return std::nullopt;
  return in;
}

void read_infusions(Context& cx, const toml::node& node, const std::string& path, TrialStep& step) {
  const toml::array* list = node.as_array();
  if (!list || !list->is_array_of_tables()) {
    cx.add(InputError(path, "", "is " + node_kind(node), "[[step.infusion]] tables"), node);
    return;
  }
  int n = 0;
  for (const toml::node& item : *list) {
    TableReader r(cx, *item.as_table(), path + "[" + std::to_string(++n) + "]");
    TrialInfusion inf;
    inf.place = place_of(item, cx.file);
    std::optional<std::string> drug;
    r.required("drug", "drug = \"norepinephrine\"");
    r.text("drug", drug);
    inf.drug = drug.value_or("");
    r.text("rate", inf.rate);
    r.text("dose", inf.dose);
    r.text("concentration", inf.concentration);
    r.finish();
    inf.parsed = parse_infusion(cx, r, *item.as_table(), inf);
    step.infusions.push_back(inf);
  }
}

// One before/after value of a preload test, typed by what was measured.
void read_preload_value(TableReader& r, std::string_view key, PreloadMeasure measure,
                        std::optional<PreloadValue>& out) {
  switch (measure) {
    case PreloadMeasure::ppv: {
      std::optional<Ratio> v;
      r.quantity(key, "%", v, "ppv");
      if (v) out = *v;
      return;
    }
    case PreloadMeasure::cardiac_output: {
      std::optional<Flow> v;
      r.quantity(key, "L/min", v, "co");
      if (v) out = *v;
      return;
    }
    case PreloadMeasure::stroke_volume: {
      std::optional<Volume> v;
      r.quantity(key, "mL", v, "stroke_volume");
      if (v) out = *v;
      return;
    }
    case PreloadMeasure::vti: {
      std::optional<Length> v;
      r.quantity(key, "cm", v, "vti");
      if (v) out = *v;
      return;
    }
  }
}

struct PreloadKindName {
  const char* key;
  PreloadTestKind kind;
};
constexpr PreloadKindName kPreloadKinds[] = {
    {"vt_challenge", PreloadTestKind::vt_challenge},
    {"eeo", PreloadTestKind::end_expiratory_occlusion},
    {"plr", PreloadTestKind::passive_leg_raising},
    {"fluid_challenge", PreloadTestKind::fluid_challenge},
    {"mini_fluid", PreloadTestKind::mini_fluid_challenge},
};

void read_one_preload_test(Context& cx, TableReader& r, const toml::table& table,
                           PreloadTestKind kind, TrialStep& step) {
  TrialPreloadTest test;
  test.place = place_of(table, cx.file);
  test.inputs.kind = kind;
  test.inputs.measure = default_measure(kind);
  std::vector<std::pair<std::string, PreloadMeasure>> words;
  for (PreloadMeasure m : accepted_measures(kind)) words.emplace_back(to_string(m), m);
  std::optional<PreloadMeasure> measure;
  r.choice<PreloadMeasure>("measure", words, measure);
  if (measure) test.inputs.measure = *measure;
  std::optional<PreloadValue> before, after;
  r.required("before", "the value measured before the test");
  r.required("after", "the value measured after the test");
  read_preload_value(r, "before", test.inputs.measure, before);
  read_preload_value(r, "after", test.inputs.measure, after);
  if (kind == PreloadTestKind::fluid_challenge || kind == PreloadTestKind::mini_fluid_challenge) {
    r.quantity("volume", "mL", test.inputs.fluid.volume, "fluid_volume");
    r.quantity("duration", "min", test.inputs.fluid.duration, "fluid_duration");
    r.text("fluid", test.inputs.fluid.fluid);
  }
  if (kind == PreloadTestKind::end_expiratory_occlusion)
    r.quantity("hold", "s", test.inputs.hold, "eeo_hold");
  if (kind == PreloadTestKind::vt_challenge) {
    r.quantity("vt_before", "mL", test.vt_before, "vt");
    r.quantity("vt_after", "mL", test.vt_after, "vt");
  }
  std::optional<bool> passive;
  r.boolean("passive", passive);
  test.inputs.passive = passive;
  r.finish();
  if (!before || !after) return;
  test.inputs.before = *before;
  test.inputs.after = *after;
  step.preload_tests.push_back(test);
}

void read_preload_tests(Context& cx, TableReader& outer, const toml::table& table,
                        TrialStep& step) {
  for (const auto& [name, kind] : kPreloadKinds) {
    const toml::table* sub = outer.table(name);
    if (!sub) continue;
    TableReader r(cx, *sub, outer.field(name), &step.places, std::string("preload.") + name + ".");
    read_one_preload_test(cx, r, *sub, kind, step);
  }
  (void)table;
  outer.finish();
}

void read_peep_release(Context& cx, TableReader& r, const toml::table& table, TrialStep& step) {
  std::optional<Volume> eelv, vt;
  std::optional<Pressure> high, low, pplat_low, aop;
  r.required("delta_eelv", "the extra volume exhaled on release, e.g. \"310 mL\"");
  r.required("peep_high", "the PEEP before the release");
  r.required("peep_low", "the PEEP after the release");
  r.required("pplat_low", "the plateau pressure at the low PEEP");
  r.quantity("delta_eelv", "mL", eelv, "delta_eelv");
  r.quantity("peep_high", "cmH2O", high, "peep");
  r.quantity("peep_low", "cmH2O", low, "peep");
  r.quantity("pplat_low", "cmH2O", pplat_low, "pplat");
  r.quantity("vt", "mL", vt);
  r.quantity("airway_opening_pressure", "cmH2O", aop, "airway_opening_pressure");
  r.finish();
  if (!eelv || !high || !low || !pplat_low) return;
  step.peep_release =
      TrialPeepRelease{*eelv, *high, *low, *pplat_low, vt, aop, place_of(table, cx.file)};
}

void read_waveform(Context& cx, TableReader& r, const toml::table& table, TrialStep& step) {
  std::optional<std::string> file;
  std::optional<Time> start, end;
  r.required("file", "file = \"recording.edf\" (relative to the trial file)");
  r.text("file", file);
  r.quantity("start", "s", start, "waveform_time");
  r.quantity("end", "s", end, "waveform_time");
  r.finish();
  if (start && end && *end <= *start) {
    cx.add(InputError(r.field("end"), "", "is not after start", "an end time after the start time"),
           *table.get("end"));
  }
  if (file) step.waveform = TrialWaveform{*file, start, end, place_of(table, cx.file)};
}

// PBW-dependent fields of preload tests: VT given in mL becomes mL/kg PBW.
void complete_preload_tests(const TrialPatient& patient, TrialStep& step) {
  std::optional<Mass> pbw;
  if (patient.sex && patient.height) pbw = predicted_body_weight(*patient.sex, *patient.height);
  for (auto& t : step.preload_tests) {
    if (pbw && t.vt_before) t.inputs.vt_before_per_kg = tidal_volume_per_kg(*t.vt_before, *pbw);
    if (pbw && t.vt_after) t.inputs.vt_after_per_kg = tidal_volume_per_kg(*t.vt_after, *pbw);
    if (!t.inputs.passive && step.circulation.spontaneous_effort) {
      t.inputs.passive = !*step.circulation.spontaneous_effort;
    }
    if (!t.inputs.intra_abdominal_hypertension) {
      t.inputs.intra_abdominal_hypertension = step.circulation.intra_abdominal_hypertension;
    }
  }
}

// A module validator's error, placed at the value it names (or the step).
InputError locate(const InputError& e, const TrialStep& step, const std::string& step_path) {
  std::string name = e.field();
  while (!name.empty() && name.front() == '-') name.erase(name.begin());
  for (auto& ch : name) {
    if (ch == '-') ch = '_';
  }
  static const std::map<std::string, std::string> kAlias = {{"peep", "hold.peep_total"},
                                                            {"dmax", "ultrasound.ivc_dmax"},
                                                            {"dmin", "ultrasound.ivc_dmin"},
                                                            {"lvot", "ultrasound.lvot_diameter"},
                                                            {"cycles", "circulation.pp_cycles"}};
  std::string key;
  if (auto it = kAlias.find(name); it != kAlias.end() && step.places.count(it->second))
    key = it->second;
  for (const auto& [k, where] : step.places) {
    if (!key.empty()) break;
    if (k.size() > name.size() && k.compare(k.size() - name.size(), name.size(), name) == 0 &&
        k[k.size() - name.size() - 1] == '.') {
      key = k;
    }
  }
  const SourcePlace where = key.empty() ? step.place : step.places.at(key);
  const std::string field = step_path + "." + (key.empty() ? name : key);
  return InputError(field, e.value(), e.problem(), e.expected(), where);
}

// Contradictions between values of one step, found by the calculators' own validators.
void cross_check_step(Context& cx, const TrialPatient& patient, const TrialStep& step,
                      const std::string& path) {
  auto run = [&](auto&& validate) {
    try {
      validate();
    } catch (const InputError& e) {
      cx.add(locate(e, step, path));
    }
  };
  const Thresholds& t = *cx.limits;
  run([&] { validate_mechanics(trial_mechanics_inputs(patient, step), t); });
  run([&] { validate_oxygen(trial_oxygen_inputs(patient, step), t); });
  if (auto ivc = trial_ivc_inputs(patient, step)) run([&] { validate_ivc(*ivc, t); });
  if (const auto set = trial_infusion_set(patient, step); !set.infusions.empty()) {
    try {
      validate_infusions(set, t);
    } catch (const InputError& e) {
      cx.add(InputError(path + ".infusion: " + e.field(), e.value(), e.problem(), e.expected(),
                        step.infusions.front().place));
    }
  }
  if (const auto echo = trial_echo_check(patient, step, t)) cx.add(locate(*echo, step, path));
  for (const auto& test : step.preload_tests) {
    try {
      validate_preload_test(test.inputs, t);
    } catch (const InputError& e) {
      cx.add(InputError(path + ".preload." + e.field(), e.value(), e.problem(), e.expected(),
                        test.place));
    }
  }
  if (step.circulation.sbp && step.circulation.dbp &&
      *step.circulation.dbp >= *step.circulation.sbp) {
    cx.add(InputError(path + ".circulation.dbp",
                      number_text(in_mmHg(*step.circulation.dbp)) + " mmHg", "is not below SBP",
                      "a diastolic pressure below the systolic",
                      step.places.at("circulation.dbp")));
  }
}

TrialStep read_step(Context& cx, const toml::table& table, int index, const TrialPatient& patient) {
  TrialStep step;
  step.place = place_of(table, cx.file);
  const std::string path = "step[" + std::to_string(index) + "]";
  TableReader r(cx, table, path, &step.places, "");
  std::optional<std::string> label, time;
  r.required("label", "label = \"PEEP 10\" (unique within the trial)");
  r.text("label", label);
  r.text("time", time);
  step.label = label.value_or("");
  step.time = time.value_or("");

  auto sub = [&](const char* key, auto&& read) {
    const toml::table* t = r.table(key);
    if (!t) return;
    TableReader sr(cx, *t, r.field(key), &step.places, std::string(key) + ".");
    read(sr, *t);
    if (std::string(key) != "preload") sr.finish();
  };
  sub("ventilator",
      [&](TableReader& s, const toml::table& t) { read_ventilator(s, step.ventilator, cx, t); });
  sub("hold", [&](TableReader& s, const toml::table&) { read_hold(s, step.hold); });
  sub("gases", [&](TableReader& s, const toml::table&) { read_gases(s, step.gases); });
  sub("circulation",
      [&](TableReader& s, const toml::table& t) { read_circulation(s, step.circulation, cx, t); });
  sub("ultrasound",
      [&](TableReader& s, const toml::table&) { read_ultrasound(s, step.ultrasound); });
  sub("preload", [&](TableReader& s, const toml::table& t) { read_preload_tests(cx, s, t, step); });
  if (const toml::node* inf = r.raw("infusion"))
    read_infusions(cx, *inf, r.field("infusion"), step);
  if (const toml::table* t = r.table("peep_release")) {
    TableReader sr(cx, *t, r.field("peep_release"), &step.places, "peep_release.");
    read_peep_release(cx, sr, *t, step);
  }
  if (const toml::table* t = r.table("waveform")) {
    TableReader sr(cx, *t, r.field("waveform"), &step.places, "waveform.");
    read_waveform(cx, sr, *t, step);
  }
  r.finish();
  complete_preload_tests(patient, step);
  return step;
}

// The limits for this trial: built-in, the trial's site file, --thresholds.
Thresholds trial_limits(Context& cx, const toml::table& root, const TrialReadOptions& options,
                        std::optional<std::string>& named) {
  Thresholds limits = Thresholds::built_in();
  if (const toml::node* node = root.get("thresholds")) {
    const auto text = scalar_text(*node);
    if (!text || !node->is_string()) {
      cx.add(InputError("thresholds", "", "is " + node_kind(*node), "a file name in quotes"),
             *node);
    } else {
      named = *text;
      std::filesystem::path site(*text);
      if (site.is_relative()) site = std::filesystem::path(cx.file).parent_path() / site;
      try {
        limits.load_overrides(site);
      } catch (const InputError& e) {
        cx.add(e.where() ? e : e.at(place_of(*node, cx.file)));
      }
    }
  }
  if (!options.thresholds_file.empty()) limits.load_overrides(options.thresholds_file);
  limits.allow_implausible(options.allow_implausible);
  return limits;
}

void check_unique_labels(Context& cx, const Trial& trial) {
  std::set<std::string> seen;
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    const TrialStep& s = trial.steps[i];
    if (s.label.empty()) continue;
    if (!seen.insert(s.label).second) {
      cx.add(InputError(
          "step[" + std::to_string(i + 1) + "].label", s.label, "is used by an earlier step",
          "a label unique within the trial (it names the step in the report and in --reference)",
          s.places.count("label") ? s.places.at("label") : s.place));
    }
  }
}

}  // namespace

std::string read_text_file(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in)
    throw InputError("file", file.string(), "cannot be opened", "a readable trial file (TOML)");
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

LoadedTrial load_trial_file(const std::filesystem::path& file, const TrialReadOptions& options) {
  return load_trial_text(read_text_file(file), file.string(), options);
}

LoadedTrial load_trial_text(std::string_view text, const std::string& name,
                            const TrialReadOptions& options) {
  Context cx;
  cx.file = name;
  toml::table root;
  try {
    root = toml::parse(text, name);
  } catch (const toml::parse_error& e) {
    const auto& b = e.source().begin;
    throw InputErrors(
        {InputError("", "", "the file is not valid TOML: " + std::string(e.description()),
                    "valid TOML (docs/trial-file.md); a truncated file often ends inside a "
                    "string or table",
                    SourcePlace{name, static_cast<int>(b.line), static_cast<int>(b.column)})});
  }
  Trial trial;
  trial.file = name;
  Thresholds limits = trial_limits(cx, root, options, trial.thresholds_file);
  cx.limits = &limits;

  TableReader top(cx, root, "trial");
  top.raw("thresholds");
  if (const toml::table* patient = top.table("patient")) {
    read_patient(cx, *patient, trial.patient);
  } else if (!root.contains("patient")) {
    cx.add(InputError("patient", "", "is missing",
                      "a [patient] table with sex and height (docs/trial-file.md)",
                      SourcePlace{name, 1, 1}));
  }
  if (const toml::node* steps = top.raw("step")) {
    const toml::array* list = steps->as_array();
    if (!list || !list->is_array_of_tables()) {
      cx.add(InputError("step", "", "is " + node_kind(*steps), "[[step]] tables"), *steps);
    } else {
      int index = 0;
      for (const toml::node& item : *list) {
        ++index;
        const std::size_t before = cx.errors.size();
        TrialStep step = read_step(cx, *item.as_table(), index, trial.patient);
        if (cx.errors.size() == before)
          cross_check_step(cx, trial.patient, step, "step[" + std::to_string(index) + "]");
        trial.steps.push_back(std::move(step));
      }
    }
  } else if (options.require_steps) {
    cx.add(InputError("step", "", "there are no steps",
                      "at least one [[step]] table (breathbeat trial add-step)",
                      SourcePlace{name, 1, 1}));
  }
  top.finish();
  check_unique_labels(cx, trial);
  if (!cx.errors.empty()) throw InputErrors(std::move(cx.errors));
  return LoadedTrial{std::move(trial), std::move(limits)};
}

}  // namespace bb
