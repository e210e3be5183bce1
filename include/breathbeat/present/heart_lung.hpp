// The words of the typed notes of breathbeat/heart_lung.hpp: what the
// heart-lung estimate and the recruitment-to-inflation ratio measured and
// assumed.
#pragma once

#include <string>
#include <vector>

#include "breathbeat/heart_lung.hpp"

namespace bb {

// One note of estimate_peep_effect as a sentence (values from the estimate).
std::string heart_lung_note_text(HeartLungNote note, const HeartLungEstimate& e);
std::vector<std::string> heart_lung_note_texts(const HeartLungEstimate& e);

// One note of assess_recruitment as a sentence (values from the result).
std::string recruitment_note_text(RecruitmentNote note, const RecruitmentResult& r);
std::vector<std::string> recruitment_note_texts(const RecruitmentResult& r);

}  // namespace bb
