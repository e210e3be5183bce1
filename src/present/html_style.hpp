// The page style of breathbeat's HTML outputs (report_html.cpp, wave_html.cpp), internal to the
// presenters: black on white, rules rather than boxes, weight rather than colour; A4 print
// with a page break before each section marked class="page".
#pragma once

#include "breathbeat/present/svg.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"

namespace bb::html {

// The PPV grey zone of the thresholds in use, as a plot band (report and wave pages).
inline svg::Band ppv_grey_zone(const Thresholds& t) {
  const double low = in_percent(t.get<Ratio>("ppv.grey_zone_low"));
  const double high = in_percent(t.get<Ratio>("ppv.grey_zone_high"));
  return {low, high, "grey zone " + format_number(low, 0) + " to " + format_number(high, 0) + " %"};
}

// breathbeat's own page style: black on white, rules not boxes, one accent of
// weight, not colour; A4 print with a section per page group.
inline constexpr const char* kStyle = R"css(
:root { color-scheme: light; }
body { font-family: sans-serif; color: #000; background: #fff; margin: 12px auto;
  max-width: 780px; padding: 0 12px; font-size: 14px; line-height: 1.35; }
h1 { font-size: 21px; margin: 0 0 2px 0; }
h2 { font-size: 16px; margin: 20px 0 6px 0; padding-bottom: 2px; border-bottom: 2px solid #000; }
h3 { font-size: 14px; margin: 12px 0 4px 0; }
p { margin: 4px 0; }
.who { font-size: 14px; margin-bottom: 6px; }
.who span { margin-right: 14px; }
.cautions { border: 2px solid #000; padding: 4px 10px 4px 10px; margin: 6px 0 10px 0; font-size: 12.5px; }
.cautions h2 { border: none; margin: 2px 0; font-size: 13px; text-transform: uppercase; letter-spacing: 0.05em; }
.cautions ul { margin: 0; padding-left: 18px; }
table { border-collapse: collapse; font-size: 12.5px; margin: 4px 0; }
th, td { border: 1px solid #7a7a7a; padding: 2px 6px; text-align: right; vertical-align: top; }
th.label, td.label { text-align: left; font-weight: normal; }
thead th { font-weight: bold; background: #eeeeee; }
.summary th.label { font-weight: bold; }
tr.statement td { font-weight: bold; text-align: left; }
.ref, .time, .cond { font-weight: normal; font-size: 11px; }
.wide { overflow-x: auto; }
figure { margin: 10px 0 14px 0; break-inside: avoid; page-break-inside: avoid; }
.panels { display: flex; flex-wrap: wrap; gap: 8px; }
figcaption { font-size: 12px; margin-top: 2px; }
.footnotes { font-size: 11.5px; margin: 2px 0 8px 0; padding-left: 22px; }
.statements li, .findings li { margin-bottom: 3px; }
.flagged { font-weight: bold; }
footer { margin-top: 24px; border-top: 1px solid #000; font-size: 11px; padding-top: 4px; }
@media print {
  @page { size: A4; margin: 12mm 12mm 14mm 12mm; }
  body { margin: 0; max-width: none; padding: 0; font-size: 10.5pt; }
  section.page { break-before: page; page-break-before: always; }
  h2 { break-after: avoid; page-break-after: avoid; }
  thead th { background: none; }
  .wide { overflow: visible; }
}
)css";

}  // namespace bb::html
