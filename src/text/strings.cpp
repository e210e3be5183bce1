#include "breathbeat/text/strings.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace bb {

std::string ascii_lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = ascii_lower(c);
  return out;
}

std::string_view trim_view(std::string_view s) {
  constexpr std::string_view kSpace = " \t\r\n";
  const auto first = s.find_first_not_of(kSpace);
  if (first == std::string_view::npos) return {};
  const auto last = s.find_last_not_of(kSpace);
  return s.substr(first, last - first + 1);
}

std::string trim(std::string_view s) {
  return std::string(trim_view(s));
}

std::vector<std::string_view> split_view(std::string_view s, char separator) {
  std::vector<std::string_view> out;
  if (s.empty()) return out;
  std::size_t start = 0;
  while (true) {
    const auto at = s.find(separator, start);
    if (at == std::string_view::npos) {
      out.push_back(s.substr(start));
      return out;
    }
    out.push_back(s.substr(start, at - start));
    start = at + 1;
  }
}

bool equals_ci(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    if (ascii_lower(a[i]) != ascii_lower(b[i])) return false;
  }
  return true;
}

bool starts_with_ci(std::string_view s, std::string_view prefix) {
  return s.size() >= prefix.size() && equals_ci(s.substr(0, prefix.size()), prefix);
}

std::string format_number(double v, int decimals) {
  const int d = decimals < 0 ? 0 : decimals;
  const double scale = std::pow(10.0, d);
  const double r = std::round(v * scale) / scale;
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", d, r == 0.0 ? 0.0 : r);
  return buf;
}

std::string format_deciding(double v, double cut, int decimals) {
  int d = decimals < 0 ? 0 : decimals;
  while (d < decimals + 3 && v != cut && format_number(v, d) == format_number(cut, d)) ++d;
  return format_number(v, d);
}

std::optional<std::string> closest_match(std::string_view word,
                                         const std::vector<std::string>& candidates) {
  auto distance = [](std::string_view a, std::string_view b) {
    std::vector<std::size_t> prev(b.size() + 1), cur(b.size() + 1);
    for (std::size_t j = 0; j <= b.size(); ++j) prev[j] = j;
    for (std::size_t i = 1; i <= a.size(); ++i) {
      cur[0] = i;
      for (std::size_t j = 1; j <= b.size(); ++j) {
        cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1,
                           prev[j - 1] + (ascii_lower(a[i - 1]) == ascii_lower(b[j - 1]) ? 0 : 1)});
      }
      std::swap(prev, cur);
    }
    return prev[b.size()];
  };
  // A word that only one candidate begins with is that candidate cut short ("--vt" for
  // "--vt-per-kg"), however far it is by edits.
  auto starts = [&](const std::string& c) {
    if (c.size() <= word.size()) return false;
    for (std::size_t i = 0; i < word.size(); ++i) {
      if (ascii_lower(c[i]) != ascii_lower(word[i])) return false;
    }
    return true;
  };
  const std::string_view letters = word.substr(std::min(word.find_first_not_of('-'), word.size()));
  if (letters.size() >= 2) {
    const auto n = std::count_if(candidates.begin(), candidates.end(), starts);
    if (n == 1) return *std::find_if(candidates.begin(), candidates.end(), starts);
  }
  std::optional<std::string> best;
  std::size_t best_d = std::max<std::size_t>(2, word.size() / 3) + 1;
  for (const auto& c : candidates) {
    const std::size_t d = distance(word, c);
    if (d < best_d) {
      best_d = d;
      best = c;
    }
  }
  return best;
}

}  // namespace bb
