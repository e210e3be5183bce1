// The per-setting heart-lung report of a trial, as text (steps as columns, at
// most 100 columns wide), JSON (the complete analysis, every number as
// {value, unit} with UCUM codes; schema docs/report.schema.json), CSV (one
// row per step, one column per quantity, the unit in the header) or HTML (one
// self-contained page with plots).
// The words come from the area presenters, with fields named as trial-file
// keys (FieldContext::trial_file). What each section means: docs/report.md.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <string_view>

#include "breathbeat/trial/analysis.hpp"

namespace bb {

enum class ReportFormat { text, json, csv, html };

// "text", "json", "csv" or "html"; throws InputError naming --format otherwise.
ReportFormat parse_report_format(std::string_view typed);

std::string report_text(const TrialAnalysis& analysis, std::size_t width = 100);
nlohmann::ordered_json report_json(const TrialAnalysis& analysis);
std::string report_csv(const TrialAnalysis& analysis);
// One self-contained XHTML-compatible page (inline CSS and SVG plots, no scripts, fonts or
// images); each plotted point carries report_json's number in data-x/data-y. docs/report.md.
std::string report_html(const TrialAnalysis& analysis);

// The report in the chosen format, ending with a newline.
std::string render_report(const TrialAnalysis& analysis, ReportFormat format);

}  // namespace bb
