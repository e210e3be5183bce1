// Trials of one patient side by side: names, the same-patient check, the join.
#include "breathbeat/trial/side_by_side.hpp"

#include <cmath>
#include <filesystem>
#include <stdexcept>
#include <variant>

#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

std::string patient_text(const TrialPatient& p) {
  std::string s = p.sex ? (*p.sex == Sex::male ? "male" : "female") : "sex not given";
  s += ", ";
  s += p.height ? format_number(in_cm(*p.height), 1) + " cm" : "height not given";
  return s;
}

// Renames every step label `from` -> `to` in one trial's analysis.
void relabel(TrialAnalysis& a, const std::string& name) {
  const auto re = [&](std::string& label) {
    if (!label.empty()) label = name + " " + label;
  };
  re(a.reference);
  for (StepAnalysis& s : a.steps) {
    re(s.label);
    re(s.recorded.label);
    if (s.vt_challenge_from) re(*s.vt_challenge_from);
    for (PreloadIndexReading& r : s.preload) {
      re(r.from_step);
      re(r.to_step);
    }
  }
  for (HeartLungComparison& h : a.heart_lung) {
    re(h.step);
    re(h.reference);
  }
  for (Finding& f : a.comparison) {
    for (std::string& step : f.steps) re(step);
    if (auto* t = std::get_if<TradeOffFinding>(&f.detail)) {
      for (TradeOffCost& c : t->costs) re(c.against);
    }
  }
  for (UnanalysedWaveform& w : a.unanalysed_waveforms) re(w.step);
  for (TrialVoid& v : a.voided) re(v.step);
}

std::optional<BestStepSettings> settings_of(const TrialAnalysis& a, const std::string& label) {
  for (const StepAnalysis& s : a.steps) {
    if (s.label != label) continue;
    return BestStepSettings{s.recorded.ventilator.set_peep, s.recorded.hold.peep_total,
                            s.recorded.ventilator.vt, s.mechanics_results.vt_per_kg};
  }
  return std::nullopt;
}

// Two trials' best settings differ: PEEP (set, else total) beyond the tolerance or VT (by more
// than half a millilitre, the rounding of a recorded volume), else by label.
bool settings_differ(const std::optional<BestStepSettings>& x,
                     const std::optional<BestStepSettings>& y, const std::string& label_x,
                     const std::string& label_y, Pressure tolerance) {
  if (!x || !y) return label_x != label_y;
  const auto peep = [](const BestStepSettings& b) {
    return b.set_peep ? b.set_peep : b.peep_total;
  };
  const auto px = peep(*x), py = peep(*y);
  const bool peep_known = px && py && x->set_peep.has_value() == y->set_peep.has_value();
  const bool vt_known = x->vt && y->vt;
  if (!peep_known && !vt_known) return label_x != label_y;
  if (peep_known && std::abs(in_cmH2O(*px) - in_cmH2O(*py)) > in_cmH2O(tolerance)) return true;
  return vt_known && std::abs(in_mL(*x->vt) - in_mL(*y->vt)) > 0.5;
}

bool is_best_setting(FindingKind k) {
  return k == FindingKind::best_compliance || k == FindingKind::max_do2 ||
         k == FindingKind::lowest_driving_pressure;
}

}  // namespace

std::string trial_name(const Trial& trial) {
  if (!trial.date.empty()) return trial.date;
  return std::filesystem::path(trial.file).filename().string();
}

void check_same_patient(const Trial& first, const Trial& other) {
  const TrialPatient& a = first.patient;
  const TrialPatient& b = other.patient;
  // Two different pseudonyms are two patients, whatever sex and height say.
  if (!a.label.empty() && !b.label.empty() && a.label != b.label) {
    throw InputError("file", other.file,
                     "is of another patient: labelled '" + b.label + "', while " + first.file +
                         " is labelled '" + a.label + "'",
                     "trial files of one patient (the same patient label, sex and height) to set "
                     "side by side");
  }
  const bool same_sex = a.sex == b.sex;
  const bool same_height =
      a.height && b.height && std::abs(in_cm(*a.height) - in_cm(*b.height)) <= 0.5;
  if (same_sex && same_height) return;
  std::string differs = !same_sex ? "sex" : "";
  if (!same_height) differs += std::string(differs.empty() ? "" : " and ") + "height";
  throw InputError("file", other.file,
                   "is of another patient (" + differs + "): " + patient_text(b) + ", while " +
                       first.file + " is " + patient_text(a),
                   "trial files of one patient (the same sex and height) to set side by side");
}

TrialAnalysis side_by_side(const std::vector<const Trial*>& trials,
                           std::vector<TrialAnalysis> analyses) {
  if (trials.empty() || trials.size() != analyses.size())
    throw std::logic_error("side_by_side: one analysis per trial");
  // Names, made unique: a second trial of the same date or file name gets " (2)".
  std::vector<std::string> names;
  for (std::size_t i = 0; i < trials.size(); ++i) {
    std::string name = trial_name(*trials[i]);
    int n = 1;
    const std::string base = name;
    while (std::find(names.begin(), names.end(), name) != names.end())
      name = base + " (" + std::to_string(++n) + ")";
    names.push_back(name);
  }
  // Where each trial's best settings were, by the labels of its own file.
  std::vector<BestAcrossTrials> best;
  for (FindingKind kind :
       {FindingKind::best_compliance, FindingKind::max_do2, FindingKind::lowest_driving_pressure}) {
    BestAcrossTrials b{kind, {}, {}, false};
    std::size_t found = 0;
    for (const TrialAnalysis& a : analyses) {
      std::string label;
      for (const Finding& f : a.comparison) {
        if (f.kind == kind && is_best_setting(f.kind) && !f.steps.empty()) label = f.steps.front();
      }
      found += !label.empty();
      b.best.push_back(label);
      b.settings.push_back(label.empty() ? std::nullopt : settings_of(a, label));
    }
    if (found < 2) continue;
    const Pressure tolerance = analyses.front().limits.get<Pressure>("trial.same_peep_tolerance");
    // Between the trials that have a best step, each against the one before it.
    std::optional<std::size_t> last;
    for (std::size_t i = 0; i < b.best.size(); ++i) {
      if (b.best[i].empty()) continue;
      if (last &&
          settings_differ(b.settings[*last], b.settings[i], b.best[*last], b.best[i], tolerance))
        b.changed = true;
      last = i;
    }
    best.push_back(std::move(b));
  }
  TrialAnalysis out = std::move(analyses.front());
  relabel(out, names.front());
  std::string files = out.file;
  for (std::size_t i = 1; i < analyses.size(); ++i) {
    TrialAnalysis& a = analyses[i];
    relabel(a, names[i]);
    files += ", " + a.file;
    for (auto& s : a.steps) out.steps.push_back(std::move(s));
    for (auto& h : a.heart_lung) out.heart_lung.push_back(std::move(h));
    for (auto& f : a.comparison) out.comparison.push_back(std::move(f));
    for (auto& w : a.unanalysed_waveforms) out.unanalysed_waveforms.push_back(std::move(w));
    for (auto& v : a.voided) out.voided.push_back(std::move(v));
  }
  // A weight that differs between the trials is no one weight of the patient: each trial's
  // doses per kg were computed with its own; the joined patient has none (nor a BSA from it).
  for (const Trial* t : trials) {
    const auto& w = t->patient.weight;
    const auto& w0 = trials.front()->patient.weight;
    if (w.has_value() != w0.has_value() || (w && std::abs(in_kg(*w) - in_kg(*w0)) > 0.05)) {
      out.patient.weight.reset();
      out.bsa.reset();
    }
  }
  out.file = files;
  out.trials = names;
  out.references.push_back(out.reference);
  for (std::size_t i = 1; i < analyses.size(); ++i) out.references.push_back(analyses[i].reference);
  out.best_across_trials = std::move(best);
  return out;
}

}  // namespace bb
