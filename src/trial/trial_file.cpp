// Reading a trial file: TOML through toml++, every field as the field registry
// declares it (breathbeat/fields/registry.hpp: key, kind, dimension, default
// unit, plausibility range, old spellings), every problem collected with its
// file:line:column. Only where a value lands in the model and the few values
// with their own grammar (I:E, pulse-pressure cycles, infusion texts, preload
// before/after) are written out here.
#include "breathbeat/trial/trial_file.hpp"

#include <toml++/toml.h>

#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <stdexcept>
#include <type_traits>
#include <variant>

#include "breathbeat/echo.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/trial/analysis.hpp"

namespace bb {

namespace {

SourcePlace place_of(const toml::node& node, const std::string& file) {
  const auto& b = node.source().begin;
  return SourcePlace{file, static_cast<int>(b.line), static_cast<int>(b.column)};
}

std::string place_text(const SourcePlace& p) {
  return p.file + ":" + std::to_string(p.line) + ":" + std::to_string(p.column);
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

std::string or_list(const std::vector<std::string>& words) {
  std::string out;
  for (const auto& w : words) out += (out.empty() ? "" : " or ") + w;
  return out;
}

// ---- where a field lands in the model -------------------------------------------

// A flag the model keeps with the opposite polarity (passive -> spontaneous_effort).
struct Negated {
  std::optional<bool>* target;
};
// I:E written "1:2", kept as its expiratory part (2).
struct IeRatio {
  std::optional<double>* expiratory;
};
using Slot = std::variant<
    std::monostate, std::optional<Pressure>*, std::optional<Volume>*, std::optional<Flow>*,
    std::optional<Time>*, std::optional<Length>*, std::optional<Mass>*,
    std::optional<MassConcentration>*, std::optional<AmountConcentration>*, std::optional<Ratio>*,
    std::optional<Frequency>*, std::optional<double>*, std::optional<std::string>*,
    std::optional<bool>*, Negated, std::optional<Sex>*, std::optional<VentMode>*,
    std::optional<Breathing>*, std::optional<PreloadMeasure>*, std::optional<PreloadTestKind>*,
    std::optional<FluidObjective>*, IeRatio, std::vector<BreathPulsePressures>*>;

// The model's value of a choice word (the word is one of the registry's choices).
template <class E>
E from_word(std::string_view id, std::string_view word,
            std::initializer_list<std::pair<std::string_view, E>> words) {
  for (const auto& [w, e] : words) {
    if (w == word) return e;
  }
  throw std::logic_error("choice '" + std::string(word) + "' of field " + std::string(id) +
                         " has no value in the trial model");
}
void set_word(std::string_view id, std::string_view w, std::optional<Sex>& out) {
  out = from_word<Sex>(id, w, {{"male", Sex::male}, {"female", Sex::female}});
}
void set_word(std::string_view id, std::string_view w, std::optional<VentMode>& out) {
  out = from_word<VentMode>(id, w,
                            {{"vc", VentMode::volume_control}, {"pc", VentMode::pressure_control}});
}
void set_word(std::string_view id, std::string_view w, std::optional<Breathing>& out) {
  out = breathing_from_word(w);
  if (!out) {
    throw std::logic_error("choice '" + std::string(w) + "' of field " + std::string(id) +
                           " has no value in the trial model");
  }
}
void set_word(std::string_view id, std::string_view w, std::optional<PreloadMeasure>& out) {
  out = from_word<PreloadMeasure>(id, w,
                                  {{"ppv", PreloadMeasure::ppv},
                                   {"co", PreloadMeasure::cardiac_output},
                                   {"sv", PreloadMeasure::stroke_volume},
                                   {"vti", PreloadMeasure::vti}});
}
// The manoeuvre words (field `manoeuvre`).
void set_word(std::string_view id, std::string_view w, std::optional<PreloadTestKind>& out) {
  out = from_word<PreloadTestKind>(id, w,
                                   {{"plr", PreloadTestKind::passive_leg_raising},
                                    {"fluid", PreloadTestKind::fluid_challenge},
                                    {"mini_fluid", PreloadTestKind::mini_fluid_challenge},
                                    {"eeo", PreloadTestKind::end_expiratory_occlusion}});
}
void set_word(std::string_view id, std::string_view w, std::optional<FluidObjective>& out) {
  out = fluid_objective_from_word(w);
  if (!out) {
    throw std::logic_error("choice '" + std::string(w) + "' of field " + std::string(id) +
                           " has no value in the trial model");
  }
}

// The fields of [patient], of a step's own keys and of its sub-tables, by id.
Slot patient_slot(std::string_view id, TrialPatient& p, std::optional<std::string>& label) {
  if (id == "sex") return &p.sex;
  if (id == "height") return &p.height;
  if (id == "weight") return &p.weight;
  if (id == "age") return &p.age_years;
  if (id == "patient_label") return &label;
  return std::monostate{};
}

Slot step_slot(std::string_view id, TrialStep& s) {
  TrialVentilator& v = s.ventilator;
  TrialHold& h = s.hold;
  TrialGases& g = s.gases;
  TrialCirculation& c = s.circulation;
  TrialUltrasound& u = s.ultrasound;
  const std::pair<std::string_view, Slot> slots[] = {
      {"mode", &v.mode},
      {"set_peep", &v.set_peep},
      {"vt", &v.vt},
      {"pinsp", &v.pinsp},
      {"pc_pressure_total", &v.pc_pressure_total},
      {"pc_pressure_above_peep", &v.pc_pressure_above_peep},
      {"rr", &v.rr},
      {"ti", &v.ti},
      {"ie", IeRatio{&v.ie_expiratory}},
      {"fio2", &v.fio2},
      {"flow", &v.flow},
      {"pmean", &v.pmean},
      {"ppeak", &h.ppeak},
      {"pplat", &h.pplat},
      {"peep_total", &h.peep_total},
      {"pes_ee", &h.pes_ee},
      {"pes_ei", &h.pes_ei},
      {"pao2", &g.pao2},
      {"paco2", &g.paco2},
      {"sao2", &g.sao2},
      {"spo2", &g.spo2},
      {"svo2", &g.svo2},
      {"scvo2", &g.scvo2},
      {"pvo2", &g.pvo2},
      {"hb", &g.hb},
      {"lactate", &g.lactate},
      {"hr", &c.hr},
      {"regular_rhythm", &c.rhythm_regular},
      {"sbp", &c.sbp},
      {"dbp", &c.dbp},
      {"map", &c.map},
      {"cvp", &c.cvp},
      {"pmsf", &c.pmsf},
      {"co", &c.co},
      {"co_method", &c.co_method},
      {"pp_cycles", &c.pp_cycles},
      {"ppv", &c.ppv_monitor},
      {"svv", &c.svv},
      {"passive", Negated{&c.spontaneous_effort}},
      {"closed_chest", Negated{&c.chest_open}},
      {"iah", &c.intra_abdominal_hypertension},
      {"rv_failure", &c.rv_failure},
      {"ivc_dmax", &u.ivc_dmax},
      {"ivc_dmin", &u.ivc_dmin},
      {"ivc_breathing", &u.ivc_breathing},
      {"lvot_diameter", &u.lvot_diameter},
      {"vti", &u.vti},
  };
  for (const auto& [k, slot] : slots) {
    if (k == id) return slot;
  }
  return std::monostate{};
}

// ---- reading ----------------------------------------------------------------------

// Everything one read needs: the file name, the collected problems and notes, the limits.
// A bare number refused as implausible in its default unit, with the units that
// would place it in range written as the file would hold them: "92 g/L".
InputError with_unit_suggestion(const InputError& e, const Thresholds& limits,
                                const std::string& text, Dimension dimension,
                                std::string_view default_unit, std::string_view plausibility) {
  if (plausibility.empty() || e.problem().rfind("is outside the plausible range", 0) != 0) return e;
  std::vector<std::string> meant;
  try {
    for (const std::string& unit : limits.units_meant(plausibility, text, dimension, default_unit))
      meant.push_back("\"" + std::string(trim_view(text)) + " " + unit + "\"");
  } catch (const InputError&) {
    return e;  // no suggestion rather than a second error
  }
  if (meant.empty()) return e;
  return InputError(
      e.field(), e.value(),
      e.problem() + " for a bare number, which is read as " + std::string(default_unit),
      e.expected() + "; did you mean " + or_list(meant) + "?");
}

struct Context {
  std::string file;
  std::vector<InputError> errors;
  const Thresholds* limits = nullptr;
  std::map<std::string, SourcePlace> patient_places;  // "patient.weight"
  // Old spellings used: the first place and how many times.
  struct OldSpelling {
    std::string note;
    SourcePlace first;
    int count = 0;
  };
  std::map<std::string, OldSpelling> old_spellings;

  void add(InputError e, const toml::node& node) { errors.push_back(e.at(place_of(node, file))); }
  void add(InputError e) { errors.push_back(std::move(e)); }

  // In the order of their first use.
  std::vector<std::string> notes() const {
    std::vector<const OldSpelling*> used;
    for (const auto& [spelling, o] : old_spellings) used.push_back(&o);
    std::sort(used.begin(), used.end(), [](const OldSpelling* a, const OldSpelling* b) {
      return std::pair(a->first.line, a->first.column) < std::pair(b->first.line, b->first.column);
    });
    std::vector<std::string> out;
    for (const OldSpelling* o : used) {
      std::string n = place_text(o->first) + ": " + o->note;
      if (o->count > 1) n += " (used " + std::to_string(o->count) + " times)";
      out.push_back(n);
    }
    return out;
  }
};

// Reads the keys of one table, field by field as the registry declares them;
// finish() reports every other key as unknown, with a did-you-mean among the
// table's own keys.
class TableReader {
 public:
  TableReader(Context& cx, const toml::table& table, std::string path,
              std::map<std::string, SourcePlace>* places = nullptr, std::string place_prefix = "")
      : cx_(cx),
        table_(table),
        path_(std::move(path)),
        places_(places),
        prefix_(std::move(place_prefix)) {}

  std::string field(std::string_view key) const { return path_ + "." + std::string(key); }
  const std::string& path() const { return path_; }

  // A key of the table that is not a registry field (a sub-table).
  const toml::node* raw(std::string_view key) {
    known_.emplace_back(key);
    suggest_.emplace_back(key);
    const toml::node* node = table_.get(key);
    if (node && places_) (*places_)[prefix_ + std::string(key)] = place_of(*node, cx_.file);
    return node;
  }

  const toml::table* table(std::string_view key) {
    const toml::node* node = raw(key);
    if (!node) return nullptr;
    if (const toml::table* t = node->as_table()) return t;
    cx_.add(InputError(field(key), "", "is " + node_kind(*node), "a table [" + field(key) + "]"),
            *node);
    return nullptr;
  }

  // A registry field as written: under its key or an old spelling of it.
  struct Found {
    const toml::node* node = nullptr;
    std::string key;        // as written
    bool inverted = false;  // an old spelling of the opposite polarity
  };

  Found find(const FieldSpec& f) {
    const std::string key(file_key(f));
    known_.push_back(key);
    suggest_.push_back(key);
    Found found;
    if (const toml::node* node = table_.get(key)) found = Found{node, key, false};
    for (std::string_view a : split_view(f.aliases, ',')) {
      const bool inverted = !a.empty() && a.front() == '!';
      if (inverted) a.remove_prefix(1);
      if (a.empty() || a.rfind("--", 0) == 0 || a.find('=') != std::string_view::npos) continue;
      const std::string old(a);
      known_.push_back(old);
      const toml::node* node = table_.get(old);
      if (!node) continue;
      if (found.node) {
        cx_.add(InputError(
                    field(old), "", "states the same fact as '" + found.key + "' in the same table",
                    "either '" + found.key + "' or its old spelling '" + old + "', not both"),
                *node);
        continue;
      }
      found = Found{node, old, inverted};
      auto& o = cx_.old_spellings[old];
      if (o.count++ == 0) {
        o.note = deprecation_note(old, AliasHit{&f, inverted}, FieldContext::trial_file);
        o.first = place_of(*node, cx_.file);
      }
    }
    if (found.node && places_) (*places_)[prefix_ + key] = place_of(*found.node, cx_.file);
    return found;
  }

  // Reads `f` into its place in the model.
  void read(const FieldSpec& f, const Slot& slot) {
    if (std::holds_alternative<std::monostate>(slot)) {
      throw std::logic_error("field " + std::string(f.id) + " has no place in the trial model");
    }
    const Found at = find(f);
    if (!at.node) return;
    std::visit([&](auto target) { assign(f, at, target); }, slot);
  }

  // Reads every field of a registry table that `slot_of` places.
  template <class SlotOf>
  void read_table(std::string_view table, SlotOf&& slot_of) {
    for (const FieldSpec* f : fields_of_table(table)) read(*f, slot_of(*f));
  }

  // A quantity of type Q with this unit and range (preload before/after: by measure).
  template <class Q>
  void quantity(const Found& at, std::string_view default_unit, std::string_view plausibility,
                std::optional<Q>& out) {
    const std::string name = field(at.key);
    const auto text = scalar_text(*at.node);
    if (!text) {
      cx_.add(
          InputError(name, "", "is " + node_kind(*at.node),
                     "a number or text with a unit, e.g. \"10 " + std::string(default_unit) + "\""),
          *at.node);
      return;
    }
    try {
      // PPV and SVV (the fields and a PPV before/after, by their ranges) are percentage
      // points: a bare number is percent and one below 1 is refused (parse_percent_points).
      const Q value = [&]() -> Q {
        if constexpr (std::is_same_v<Q, Ratio>) {
          if (plausibility == "ppv" || plausibility == "svv")
            return parse_percent_points(*text, name);
        }
        return parse_quantity<Q>(*text, Field{name, default_unit});
      }();
      if (!plausibility.empty()) cx_.limits->check_plausible(plausibility, value);
      out = value;
    } catch (const InputError& e) {
      cx_.add(
          with_unit_suggestion(
              InputError(name, e.value().empty() ? *text : e.value(), e.problem(), e.expected()),
              *cx_.limits, *text, DimensionOf<Q>::value, default_unit, plausibility),
          *at.node);
    }
  }

  std::optional<std::string> text(const Found& at) {
    if (auto t = scalar_text(*at.node)) return t;
    if (at.node->is_time() || at.node->is_date_time() || at.node->is_date()) {
      std::ostringstream s;
      if (at.node->is_time()) s << *at.node->value<toml::time>();
      if (at.node->is_date()) s << *at.node->value<toml::date>();
      if (at.node->is_date_time()) s << *at.node->value<toml::date_time>();
      return s.str();
    }
    cx_.add(InputError(field(at.key), "", "is " + node_kind(*at.node), "text in quotes"), *at.node);
    return std::nullopt;
  }

  std::optional<bool> boolean(const Found& at) {
    std::optional<bool> value;
    if (at.node->is_boolean()) value = *at.node->value<bool>();
    const auto written = scalar_text(*at.node);
    if (!value && written && (*written == "yes" || *written == "no")) value = *written == "yes";
    if (!value) {
      cx_.add(
          InputError(field(at.key), written.value_or(""), "is not a yes/no value", "true or false"),
          *at.node);
      return std::nullopt;
    }
    return at.inverted ? !*value : *value;
  }

  // A choice word, matched without case and '-' vs '_'.
  std::optional<std::string> choice(const FieldSpec& f, const Found& at) {
    const auto word = text(at);
    if (!word) return std::nullopt;
    if (auto w = match_choice(f, *word)) return w;
    if (const auto meant = unclear_choice(f, *word); !meant.empty()) {
      cx_.add(InputError(field(at.key), *word, unclear_choice_problem(meant), std::string(f.help)),
              *at.node);
      return std::nullopt;
    }
    std::string expected = or_list(choice_words(f));
    if (auto near = closest_match(ascii_lower(*word), choice_words(f)))
      expected += " (did you mean '" + *near + "'?)";
    cx_.add(InputError(field(at.key), *word, "is not a recognised choice", expected), *at.node);
    return std::nullopt;
  }

  void required(std::string_view id) {
    const FieldSpec& f = field_spec(id);
    if (!table_.contains(file_key(f))) {
      cx_.add(InputError(field(file_key(f)), "", "is missing", std::string(f.help)), table_);
    }
  }

  void finish() {
    for (const auto& [k, node] : table_) {
      const std::string key(k.str());
      if (std::find(known_.begin(), known_.end(), key) != known_.end()) continue;
      std::string expected = "one of the fields of [" + path_ + "] (docs/trial-file.md)";
      if (auto near = closest_match(key, suggest_)) expected = "'" + *near + "' (did you mean it?)";
      cx_.add(InputError(field(key), "", "is not a known field", expected), node);
    }
  }

 private:
  void assign(const FieldSpec& f, const Found&, std::monostate) {
    throw std::logic_error("field " + std::string(f.id) + " has no place in the trial model");
  }

  template <class T>
  void assign(const FieldSpec& f, const Found& at, std::optional<T>* out) {
    if constexpr (std::is_same_v<T, bool>) {
      if (auto b = boolean(at)) *out = *b;
    } else if constexpr (std::is_same_v<T, std::string>) {
      if (auto t = text(at)) *out = *t;
    } else if constexpr (std::is_same_v<T, double>) {
      const auto t = text(at);
      if (!t) return;
      try {
        const double v = parse_number(*t, Field{field(at.key), ""});
        if (!f.plausibility.empty())
          cx_.limits->check_plausible_si(f.plausibility, v, Dimension::number);
        *out = v;
      } catch (const InputError& e) {
        cx_.add(InputError(field(at.key), *t, e.problem(), e.expected()), *at.node);
      }
    } else if constexpr (std::is_enum_v<T>) {
      if (auto w = choice(f, at)) set_word(f.id, *w, *out);
    } else {
      if (DimensionOf<T>::value != f.dimension) {
        throw std::logic_error("field " + std::string(f.id) +
                               " has another dimension in the trial model");
      }
      quantity(at, f.default_unit, f.plausibility, *out);
    }
  }

  void assign(const FieldSpec&, const Found& at, Negated n) {
    if (auto b = boolean(at)) *n.target = !*b;
  }

  void assign(const FieldSpec&, const Found& at, IeRatio ie) {
    const auto t = text(at);
    if (!t) return;
    const auto colon = t->find(':');
    try {
      if (colon == std::string::npos) throw InputError("", "", "", "");
      const double i = parse_number(t->substr(0, colon), Field{field(at.key), ""});
      const double e = parse_number(t->substr(colon + 1), Field{field(at.key), ""});
      if (i <= 0 || e <= 0) throw InputError("", "", "", "");
      *ie.expiratory = e / i;
    } catch (const InputError&) {
      cx_.add(InputError(field(at.key), *t, "is not an I:E ratio", "text like \"1:2\""), *at.node);
    }
  }

  void assign(const FieldSpec& f, const Found& at, std::vector<BreathPulsePressures>* out) {
    const auto t = text(at);
    if (!t) return;
    try {
      *out = parse_pulse_pressure_cycles(*t, field(at.key), f.default_unit);
      for (const auto& b : *out) {
        cx_.limits->check_plausible(f.plausibility, b.pp_max);
        cx_.limits->check_plausible(f.plausibility, b.pp_min);
      }
    } catch (const InputError& e) {
      cx_.add(InputError(field(at.key), e.value(), e.problem(), e.expected()), *at.node);
      out->clear();
    }
  }

  Context& cx_;
  const toml::table& table_;
  std::string path_;
  std::map<std::string, SourcePlace>* places_;
  std::string prefix_;
  std::vector<std::string> known_;    // keys that are not unknown (old spellings too)
  std::vector<std::string> suggest_;  // keys a did-you-mean may offer
};

// ---- the patient ------------------------------------------------------------

void read_patient(Context& cx, const toml::table& table, TrialPatient& p) {
  TableReader r(cx, table, "patient", &cx.patient_places, "patient.");
  r.required("sex");
  r.required("height");
  std::optional<std::string> label;
  r.read_table("patient", [&](const FieldSpec& f) { return patient_slot(f.id, p, label); });
  p.label = label.value_or("");
  r.finish();
}

// ---- infusions ------------------------------------------------------------------

// The infusion module's reading of one [[step.infusion]]; problems are collected.
std::optional<InfusionInput> parse_infusion(Context& cx, TableReader& r, const toml::table& table,
                                            const TrialInfusion& inf) {
  if (inf.drug.empty()) return std::nullopt;
  InfusionInput in;
  auto attempt = [&](std::string_view id, auto&& parse) {
    const FieldSpec& f = field_spec(id);
    const std::string name = r.field(file_key(f));  // Field holds a view: keep the string alive
    const Field field{name, f.default_unit};
    try {
      parse(field);
      return true;
    } catch (const InputError& e) {
      const toml::node* node = table.get(file_key(f));
      cx.add(InputError(std::string(field.name), e.value(), e.problem(), e.expected()),
             node ? *node : table);
      return false;
    }
  };
  if (!attempt("drug", [&](const Field& fd) { in.drug = parse_drug(inf.drug, fd); }))
    return std::nullopt;
  const DoseBasis basis = drug_info(in.drug).basis;
  bool ok = true;
  if (inf.rate)
    ok &= attempt("rate", [&](const Field& fd) { in.rate = parse_infusion_rate(*inf.rate, fd); });
  if (inf.concentration) {
    ok &= attempt("concentration", [&](const Field& fd) {
      in.conc = parse_drug_concentration(*inf.concentration, basis, fd);
    });
  }
  if (inf.dose)
    ok &= attempt("dose",
                  [&](const Field& fd) { in.dose = parse_drug_dose(*inf.dose, in.drug, fd); });
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
    r.required("drug");
    r.read_table("infusion", [&](const FieldSpec& f) -> Slot {
      if (f.id == "drug") return &drug;
      if (f.id == "rate") return &inf.rate;
      if (f.id == "dose") return &inf.dose;
      if (f.id == "concentration") return &inf.concentration;
      return std::monostate{};
    });
    inf.drug = drug.value_or("");
    r.finish();
    inf.parsed = parse_infusion(cx, r, *item.as_table(), inf);
    step.infusions.push_back(inf);
  }
}

// ---- preload tests -------------------------------------------------------------------

// The preload tests, by their table name (the registry's `kind` words).
struct PreloadKindName {
  std::string_view word;
  PreloadTestKind kind;
};
constexpr PreloadKindName kPreloadKinds[] = {
    {"vt_challenge", PreloadTestKind::vt_challenge},
    {"eeo", PreloadTestKind::end_expiratory_occlusion},
    {"plr", PreloadTestKind::passive_leg_raising},
    {"fluid_challenge", PreloadTestKind::fluid_challenge},
    {"mini_fluid", PreloadTestKind::mini_fluid_challenge},
};

std::string_view preload_word(PreloadTestKind kind) {
  for (const auto& k : kPreloadKinds) {
    if (k.kind == kind) return k.word;
  }
  return "";
}

// Whether a field of [step.preload.*] belongs to this test.
bool applies(std::string_view id, PreloadTestKind kind) {
  const bool fluid =
      kind == PreloadTestKind::fluid_challenge || kind == PreloadTestKind::mini_fluid_challenge;
  if (id == "volume" || id == "duration" || id == "fluid") return fluid;
  if (id == "hold") return kind == PreloadTestKind::end_expiratory_occlusion;
  if (id == "vt_before" || id == "vt_after") return kind == PreloadTestKind::vt_challenge;
  return true;
}

// One before/after value of a preload test, typed by what was measured: the unit
// and range of the field that measures it ("stroke_volume" has no field of its own).
void read_preload_value(TableReader& r, const TableReader::Found& at, PreloadMeasure measure,
                        std::optional<PreloadValue>& out) {
  auto as = [&](auto q, std::string_view id) {
    std::optional<decltype(q)> v;
    const FieldSpec& f = field_spec(id);
    r.quantity(at, f.default_unit, f.plausibility, v);
    if (v) out = *v;
  };
  switch (measure) {
    case PreloadMeasure::ppv:
      return as(Ratio{}, "ppv");
    case PreloadMeasure::cardiac_output:
      return as(Flow{}, "co");
    case PreloadMeasure::vti:
      return as(Length{}, "vti");
    case PreloadMeasure::stroke_volume: {
      std::optional<Volume> v;
      r.quantity(at, "mL", "stroke_volume", v);
      if (v) out = *v;
      return;
    }
  }
}

void read_one_preload_test(Context& cx, TableReader& r, const toml::table& table,
                           PreloadTestKind kind, TrialStep& step) {
  TrialPreloadTest test;
  test.place = place_of(table, cx.file);
  test.inputs.kind = kind;
  test.inputs.measure = default_measure(kind);
  std::optional<PreloadMeasure> measure;
  std::optional<PreloadValue> before, after;
  r.required("before");
  r.required("after");
  const FieldSpec& measure_field = field_spec("measure");
  r.read(measure_field, &measure);
  if (measure) {
    const auto accepted = accepted_measures(kind);
    if (std::find(accepted.begin(), accepted.end(), *measure) != accepted.end()) {
      test.inputs.measure = *measure;
    } else {
      std::vector<std::string> words;
      words.reserve(accepted.size());
      for (PreloadMeasure m : accepted) words.emplace_back(to_string(m));
      cx.add(InputError(r.field(file_key(measure_field)), to_string(*measure),
                        "is not measured in this test", or_list(words)),
             *table.get(file_key(measure_field)));
    }
  }
  for (const FieldSpec* f : fields_of_table("preload.*")) {
    if (f->id == "measure") continue;
    if (!applies(f->id, kind)) {
      // Another test's field ("hold" of an EEO in a PLR): said so, with what it is for.
      if (const toml::node* node = r.raw(file_key(*f))) {
        cx.add(InputError(r.field(file_key(*f)), "",
                          std::string("is not a field of the ") + display_name(kind),
                          "the fields of that test; this one is for the " + std::string(f->help)),
               *node);
      }
      continue;
    }
    if (f->id == "before" || f->id == "after") {
      const TableReader::Found at = r.find(*f);
      if (at.node)
        read_preload_value(r, at, test.inputs.measure, f->id == "before" ? before : after);
      continue;
    }
    const std::string_view id = f->id;
    r.read(*f, [&]() -> Slot {
      if (id == "volume") return &test.inputs.fluid.volume;
      if (id == "duration") return &test.inputs.fluid.duration;
      if (id == "fluid") return &test.inputs.fluid.fluid;
      if (id == "hold") return &test.inputs.hold;
      if (id == "vt_before") return &test.vt_before;
      if (id == "vt_after") return &test.vt_after;
      return std::monostate{};
    }());
  }
  // The patient's breathing during this test: the step's `passive` fact, for this test only.
  r.read(field_spec("passive"), &test.inputs.passive);
  r.finish();
  if (!before || !after) return;
  test.inputs.before = *before;
  test.inputs.after = *after;
  step.preload_tests.push_back(test);
}

void read_preload_tests(Context& cx, TableReader& outer, TrialStep& step) {
  for (const auto& [word, kind] : kPreloadKinds) {
    const toml::table* sub = outer.table(word);
    if (!sub) continue;
    TableReader r(cx, *sub, outer.field(word), &step.places, "preload." + std::string(word) + ".");
    read_one_preload_test(cx, r, *sub, kind, step);
  }
  outer.finish();
}

// ---- PEEP release, waveform --------------------------------------------------------

void read_peep_release(Context& cx, TableReader& r, const toml::table& table, TrialStep& step) {
  std::optional<Volume> eelv, vt;
  std::optional<Pressure> high, low, pplat_low, aop;
  for (const char* id : {"delta_eelv", "peep_high", "peep_low", "pplat_low"}) r.required(id);
  r.read_table("peep_release", [&](const FieldSpec& f) -> Slot {
    if (f.id == "delta_eelv") return &eelv;
    if (f.id == "peep_high") return &high;
    if (f.id == "peep_low") return &low;
    if (f.id == "pplat_low") return &pplat_low;
    if (f.id == "release_vt") return &vt;
    if (f.id == "airway_opening_pressure") return &aop;
    return std::monostate{};
  });
  r.finish();
  if (!eelv || !high || !low || !pplat_low) return;
  step.peep_release =
      TrialPeepRelease{*eelv, *high, *low, *pplat_low, vt, aop, place_of(table, cx.file)};
}

void read_waveform(Context& cx, TableReader& r, const toml::table& table, TrialStep& step) {
  std::optional<std::string> file;
  std::optional<Time> start, end;
  r.required("record");
  r.read_table("waveform", [&](const FieldSpec& f) -> Slot {
    if (f.id == "record") return &file;
    if (f.id == "from") return &start;
    if (f.id == "to") return &end;
    return std::monostate{};
  });
  r.finish();
  if (start && end && *end <= *start) {
    const std::string_view end_key = file_key(field_spec("to"));
    cx.add(
        InputError(r.field(end_key), "", "is not after start", "an end time after the start time"),
        *table.get(end_key));
  }
  if (!file) return;
  step.waveform = TrialWaveform{};
  step.waveform->file = *file;
  step.waveform->start = start;
  step.waveform->end = end;
  step.waveform->place = place_of(table, cx.file);
}

// [step.challenge]: what a manoeuvre step records; a field that does not belong to the step's
// manoeuvre (or a table on a step that is no manoeuvre) is refused where it is written.
void read_challenge(Context& cx, TableReader& r, const toml::table& table, TrialStep& step) {
  TrialChallenge c;
  c.place = place_of(table, cx.file);
  r.read_table("challenge", [&](const FieldSpec& f) -> Slot {
    if (f.id == "challenge_fluid") return &c.fluid.fluid;
    if (f.id == "challenge_volume") return &c.fluid.volume;
    if (f.id == "challenge_duration") return &c.fluid.duration;
    if (f.id == "objective") return &c.objective;
    if (f.id == "cvp_max") return &c.cvp_max;
    if (f.id == "pf_fall_max") return &c.pf_fall_max;
    if (f.id == "spo2_fall_max") return &c.spo2_fall_max;
    if (f.id == "oedema_signs") return &c.oedema_signs;
    if (f.id == "challenge_hold") return &c.hold;
    return std::monostate{};
  });
  r.finish();
  const std::string manoeuvre_key(file_key(field_spec("manoeuvre")));
  if (!step.manoeuvre) {
    cx.add(
        InputError(r.path(), "",
                   "is the record of a manoeuvre, but this step has no '" + manoeuvre_key + "'",
                   "'" + manoeuvre_key + " = \"plr\"' (or fluid, mini_fluid, eeo) on the step, " +
                       "or no [step.challenge]"),
        table);
    return;
  }
  const PreloadTestKind kind = *step.manoeuvre;
  const bool fluid =
      kind == PreloadTestKind::fluid_challenge || kind == PreloadTestKind::mini_fluid_challenge;
  for (const FieldSpec* f : fields_of_table("challenge")) {
    const toml::node* node = table.get(file_key(*f));
    if (!node) continue;
    const bool hold = f->id == "challenge_hold";
    const bool applies =
        f->id == "objective" || (hold ? kind == PreloadTestKind::end_expiratory_occlusion : fluid);
    if (applies) continue;
    cx.add(InputError(r.field(file_key(*f)), "",
                      std::string("does not belong to a ") + display_name(kind),
                      hold ? "a hold only for an end-expiratory occlusion (eeo)"
                           : "this only for a fluid or mini fluid challenge",
                      place_of(*node, cx.file)));
  }
  // The objective must be something this test is judged by: the test's own measures (PPV is
  // not a measure of a passive leg raise), and for a fluid challenge also PPV and the
  // surrogates.
  if (c.objective) {
    const auto measures = accepted_measures(kind);
    const auto m = objective_measure(*c.objective);
    const bool ok = kind == PreloadTestKind::fluid_challenge ||
                    (m && std::find(measures.begin(), measures.end(), *m) != measures.end());
    if (!ok) {
      std::vector<std::string> words;
      words.reserve(measures.size());
      for (PreloadMeasure x : measures) words.emplace_back(to_string(x));
      const std::string key(file_key(field_spec("objective")));
      cx.add(InputError(r.field(key), to_string(*c.objective),
                        std::string("is not a measure of a ") + display_name(kind), or_list(words),
                        place_of(*table.get(key), cx.file)));
    }
  }
  step.challenge = c;
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

// ---- validators' errors, located -------------------------------------------------------

// The registry field an error names: its id, or (from a validator not yet
// naming fields by id) an option spelling, old or new ("--dmin", "cycles").
const FieldSpec* field_named(std::string_view name) {
  if (const FieldSpec* f = find_field(name)) return f;
  if (name.empty()) return nullptr;
  std::string option(name);
  if (option.rfind("--", 0) != 0) option = "--" + option;
  std::replace(option.begin(), option.end(), '_', '-');
  if (auto hit = resolve_alias(option)) return hit->field;
  for (const FieldSpec& f : all_fields()) {
    if (option_name(f) == option || (f.kind == FieldKind::flag && f.no == option)) return &f;
  }
  return nullptr;
}

// A validator's error, placed at the value it names: registry id -> file path
// ("hold.peep_total") -> where the step wrote it. `preload` names the preload
// test whose fields ("preload.*") are meant; `fallback` is where an error about
// a value the file does not hold is shown.
InputError locate(const Context& cx, const InputError& e, const TrialStep& step,
                  const std::string& step_path, std::string_view preload = {},
                  std::optional<SourcePlace> fallback = std::nullopt) {
  const SourcePlace otherwise = fallback.value_or(step.place);
  const FieldSpec* f = field_named(e.field());
  std::string path = f ? file_path(*f) : "";
  if (path.empty()) {
    std::string field = step_path;
    if (!preload.empty()) field += ".preload." + std::string(preload);
    if (!e.field().empty()) field += "." + e.field();
    return InputError(field, e.value(), e.problem(), e.expected(), otherwise);
  }
  if (f->table == "patient") {
    const auto it = cx.patient_places.find(path);
    return InputError(path, e.value(), e.problem(), e.expected(),
                      it != cx.patient_places.end() ? it->second : otherwise);
  }
  if (const auto star = path.find('*'); star != std::string::npos && !preload.empty())
    path.replace(star, 1, preload);
  const auto it = step.places.find(path);
  return InputError(step_path + "." + path, e.value(), e.problem(), e.expected(),
                    it != step.places.end() ? it->second : otherwise);
}

// Contradictions between values of one step, found by the calculators' own validators.
void cross_check_step(Context& cx, const TrialPatient& patient, const TrialStep& step,
                      const std::string& path) {
  auto run = [&](auto&& validate) {
    try {
      validate();
    } catch (const InputError& e) {
      cx.add(locate(cx, e, step, path));
    }
  };
  const Thresholds& t = *cx.limits;
  run([&] { validate_mechanics(trial_mechanics_inputs(patient, step), t); });
  run([&] { validate_oxygen(trial_oxygen_inputs(patient, step), t); });
  if (auto ivc = trial_ivc_inputs(patient, step)) run([&] { validate_ivc(*ivc, t); });
  if (auto echo = trial_echo_inputs(patient, step)) run([&] { validate_echo(*echo, t); });
  if (const auto set = trial_infusion_set(patient, step); !set.infusions.empty()) {
    try {
      validate_infusions(set, t);
    } catch (const InputError& e) {
      const FieldSpec* f = field_named(e.field());
      if (f && f->table != "infusion") {
        cx.add(locate(cx, e, step, path));
      } else {
        cx.add(InputError(path + ".infusion: " + e.field(), e.value(), e.problem(), e.expected(),
                          step.infusions.front().place));
      }
    }
  }
  for (const auto& test : step.preload_tests) {
    try {
      validate_preload_test(test.inputs, t);
    } catch (const InputError& e) {
      cx.add(locate(cx, e, step, path, preload_word(test.inputs.kind), test.place));
    }
  }
  if (step.circulation.sbp && step.circulation.dbp &&
      *step.circulation.dbp >= *step.circulation.sbp) {
    cx.add(locate(cx,
                  InputError("dbp", number_text(in_mmHg(*step.circulation.dbp)) + " mmHg",
                             "is not below SBP", "a diastolic pressure below the systolic"),
                  step, path));
  }
}

// ---- one step ----------------------------------------------------------------------

// `pinsp` does not say whether the PC pressure is total or above PEEP: refused, asking which.
void refuse_ambiguous_pinsp(Context& cx, const TableReader& r, const TrialStep& step) {
  if (!step.ventilator.pinsp) return;
  const std::string path = file_path(field_spec("pinsp"));
  const std::string total(file_key(field_spec("pc_pressure_total")));
  const std::string above(file_key(field_spec("pc_pressure_above_peep")));
  const auto it = step.places.find(path);
  cx.add(InputError(r.field(path), number_text(in_cmH2O(*step.ventilator.pinsp)) + " cmH2O",
                    "does not say whether the set PC pressure is total or above PEEP",
                    "which one is meant: '" + total + "' (total, PEEP included) or '" + above +
                        "' (above set PEEP)",
                    it != step.places.end() ? it->second : step.place));
}

TrialStep read_step(Context& cx, const toml::table& table, int index, const TrialPatient& patient) {
  TrialStep step;
  step.place = place_of(table, cx.file);
  const std::string path = "step[" + std::to_string(index) + "]";
  TableReader r(cx, table, path, &step.places, "");
  std::optional<std::string> label, time;
  r.required("label");
  r.read_table("step", [&](const FieldSpec& f) -> Slot {
    if (f.id == "label") return &label;
    if (f.id == "time") return &time;
    if (f.id == "manoeuvre") return &step.manoeuvre;
    return std::monostate{};
  });
  step.label = label.value_or("");
  step.time = time.value_or("");
  // A time in clock form is read for the intervals between steps: an impossible one would turn
  // that check off without a word, so it is refused; other free text is only shown.
  if (trial_time_has_clock_form(step.time) && !trial_clock_time(step.time)) {
    const auto it = step.places.find("time");
    cx.add(InputError(r.field("time"), step.time, "is not a possible clock time",
                      "HH:MM or HH:MM:SS with hours 00 to 23 and minutes and seconds 00 to 59 "
                      "(e.g. \"14:05\"), or a date-time such as \"2026-12-03T14:05\"; other "
                      "free text is only shown, never read as a time",
                      it != step.places.end() ? it->second : step.place));
  }

  for (const char* key : {"ventilator", "hold", "gases", "circulation", "ultrasound"}) {
    const toml::table* t = r.table(key);
    if (!t) continue;
    TableReader sr(cx, *t, r.field(key), &step.places, std::string(key) + ".");
    sr.read_table(key, [&](const FieldSpec& f) { return step_slot(f.id, step); });
    sr.finish();
  }
  refuse_ambiguous_pinsp(cx, r, step);
  if (const toml::table* t = r.table("preload")) {
    TableReader sr(cx, *t, r.field("preload"), &step.places, "preload.");
    read_preload_tests(cx, sr, step);
  }
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
  if (const toml::table* t = r.table("challenge")) {
    TableReader sr(cx, *t, r.field("challenge"), &step.places, "challenge.");
    read_challenge(cx, sr, *t, step);
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

// Errors from `checked` on that name a field already named by an earlier error
// are dropped (the field was reported once already).
void drop_repeats(std::vector<InputError>& errors, std::size_t checked) {
  std::set<std::string> named;
  for (std::size_t i = 0; i < checked; ++i) named.insert(errors[i].field());
  std::size_t out = checked;
  for (std::size_t i = checked; i < errors.size(); ++i) {
    if (named.count(errors[i].field())) continue;
    if (out != i) errors[out] = errors[i];
    ++out;
  }
  errors.erase(errors.begin() + static_cast<std::ptrdiff_t>(out), errors.end());
}

// A label used twice is reported at the later step, naming where it was first used.
void check_unique_labels(Context& cx, const Trial& trial) {
  std::map<std::string, std::size_t> first_use;
  auto label_place = [](const TrialStep& s) {
    return s.places.count("label") ? s.places.at("label") : s.place;
  };
  for (std::size_t i = 0; i < trial.steps.size(); ++i) {
    const TrialStep& s = trial.steps[i];
    if (s.label.empty()) continue;
    const auto [it, fresh] = first_use.emplace(s.label, i);
    if (fresh) continue;
    const std::size_t first = it->second;
    cx.add(InputError("step[" + std::to_string(i + 1) + "].label", s.label,
                      "is already the label of step[" + std::to_string(first + 1) + "] at " +
                          place_text(label_place(trial.steps[first])),
                      "a label unique within the trial (it names the step in the report)",
                      label_place(s)));
  }
}

// ---- [trial] ------------------------------------------------------------------------

// A calendar date written YYYY-MM-DD (a TOML date, or text).
bool is_calendar_date(std::string_view d) {
  if (d.size() != 10 || d[4] != '-' || d[7] != '-') return false;
  for (std::size_t i : {0, 1, 2, 3, 5, 6, 8, 9}) {
    if (d[i] < '0' || d[i] > '9') return false;
  }
  const auto num = [&](std::size_t at, std::size_t n) {
    return std::stoi(std::string(d.substr(at, n)));
  };
  const int y = num(0, 4), m = num(5, 2), day = num(8, 2);
  const bool leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
  const int days[] = {31, leap ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  return y >= 1900 && m >= 1 && m <= 12 && day >= 1 && day <= days[m - 1];
}

void read_trial_table(Context& cx, const toml::table& table, Trial& trial) {
  TableReader r(cx, table, "trial");
  std::optional<std::string> date;
  r.read_table("trial", [&](const FieldSpec& f) -> Slot {
    if (f.id == "date") return &date;
    return std::monostate{};
  });
  r.finish();
  if (!date) return;
  if (!is_calendar_date(*date)) {
    const std::string_view key = file_key(field_spec("date"));
    cx.add(
        InputError(r.field(key), *date, "is not a date", "a date as YYYY-MM-DD, e.g. 2026-12-03"),
        *table.get(key));
    return;
  }
  trial.date = *date;
}

// ---- corrections: [[voided]] -------------------------------------------------------

// Each [[voided]] names a step by its label (unknown: an error with a
// did-you-mean; voided already: an error naming the first record).
void read_voided(Context& cx, const toml::node& node, Trial& trial) {
  const toml::array* list = node.as_array();
  if (!list || !list->is_array_of_tables()) {
    cx.add(InputError("voided", "", "is " + node_kind(node), "[[voided]] tables"), node);
    return;
  }
  std::vector<std::string> labels;
  for (const TrialStep& s : trial.steps) labels.push_back(s.label);
  const std::string step_key(file_key(field_spec("voided_step")));
  int n = 0;
  for (const toml::node& item : *list) {
    const toml::table& table = *item.as_table();
    TableReader r(cx, table, "voided[" + std::to_string(++n) + "]");
    std::optional<std::string> step, reason, at;
    for (const char* id : {"voided_step", "reason", "voided_at"}) r.required(id);
    r.read_table("voided", [&](const FieldSpec& f) -> Slot {
      if (f.id == "voided_step") return &step;
      if (f.id == "reason") return &reason;
      if (f.id == "voided_at") return &at;
      return std::monostate{};
    });
    r.finish();
    if (reason && trim_view(*reason).empty()) {
      const std::string_view key = file_key(field_spec("reason"));
      cx.add(InputError(r.field(key), *reason, "is empty", "why the step is voided"),
             *table.get(key));
      continue;
    }
    if (!step || !reason || !at) continue;
    const toml::node& step_node = *table.get(step_key);
    const auto s = std::find_if(trial.steps.begin(), trial.steps.end(),
                                [&](const TrialStep& x) { return x.label == *step; });
    if (s == trial.steps.end()) {
      std::string expected = "the label of a step in this file";
      if (auto near = closest_match(*step, labels)) expected = "'" + *near + "' (did you mean it?)";
      cx.add(InputError(r.field(step_key), *step, "is not the label of any step", expected),
             step_node);
      continue;
    }
    const auto earlier = std::find_if(trial.voided.begin(), trial.voided.end(),
                                      [&](const TrialVoid& v) { return v.step == *step; });
    if (earlier != trial.voided.end()) {
      cx.add(InputError(r.field(step_key), *step,
                        "is voided already, at " + place_text(earlier->place),
                        "one [[voided]] record per step"),
             step_node);
      continue;
    }
    trial.voided.push_back(TrialVoid{*step, *reason, *at, place_of(item, cx.file), s->place});
  }
}

// The voided steps leave the trial's steps; a trial whose every step is voided
// has none left to report.
void leave_out_voided(Context& cx, Trial& trial, bool require_steps) {
  if (trial.voided.empty()) return;
  auto is_voided = [&](const TrialStep& s) {
    return std::any_of(trial.voided.begin(), trial.voided.end(),
                       [&](const TrialVoid& v) { return v.step == s.label; });
  };
  for (std::size_t i = 1; i < trial.steps.size(); ++i) {
    if (is_voided(trial.steps[i - 1])) trial.steps[i].voided_before = trial.steps[i - 1].label;
  }
  std::erase_if(trial.steps, is_voided);
  if (require_steps && trial.steps.empty()) {
    cx.add(InputError("voided", "", "every step of the trial is voided",
                      "at least one step in force (breathbeat trial add-step)",
                      trial.voided.back().place));
  }
}

}  // namespace

std::string read_text_file(const std::filesystem::path& file) {
  std::error_code ec;
  if (std::filesystem::is_directory(file, ec)) {
    throw InputError("file", file.string(), "is a directory", "a trial file (TOML)");
  }
  if (!std::filesystem::exists(file, ec)) {
    throw InputError("file", file.string(), "does not exist", "an existing trial file (TOML)");
  }
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
  if (text.find_first_not_of(" \t\r\n") == std::string_view::npos) {
    throw InputErrors({InputError(
        "file", "", text.empty() ? "the file is empty" : "the file holds only blank space",
        "a trial file with a [patient] table and [[step]] tables (docs/trial-file.md; "
        "breathbeat trial new starts one)",
        SourcePlace{name, 1, 1})});
  }
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
  if (const toml::table* t = top.table("trial")) read_trial_table(cx, *t, trial);
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
        TrialStep step = read_step(cx, *item.as_table(), index, trial.patient);
        // Contradictions among the values that were read, even when others in
        // the step are wrong (a value refused while reading is absent here, so
        // it takes part in no contradiction); a problem already reported for
        // the same field is not repeated.
        const std::size_t read_errors = cx.errors.size();
        cross_check_step(cx, trial.patient, step, "step[" + std::to_string(index) + "]");
        drop_repeats(cx.errors, read_errors);
        trial.steps.push_back(std::move(step));
      }
    }
  } else if (options.require_steps) {
    cx.add(InputError("step", "", "there are no steps",
                      "at least one [[step]] table (breathbeat trial add-step)",
                      SourcePlace{name, 1, 1}));
  }
  if (const toml::node* voided = top.raw("voided")) read_voided(cx, *voided, trial);
  top.finish();
  check_unique_labels(cx, trial);
  leave_out_voided(cx, trial, options.require_steps);
  if (!cx.errors.empty()) throw InputErrors(std::move(cx.errors));
  return LoadedTrial{std::move(trial), std::move(limits), cx.notes()};
}

}  // namespace bb
