// Transitional umbrella: include breathbeat/answer.hpp (domain and presenter
// model), breathbeat/present/json.hpp or breathbeat/present/text.hpp instead.
#pragma once

#include "breathbeat/answer.hpp"
#include "breathbeat/present/json.hpp"
#include "breathbeat/present/text.hpp"
