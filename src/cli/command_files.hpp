// The files a command reads and writes, gathered for bb::CommandFiles
// (breathbeat/io/output_check.hpp): a recorded waveform with the signal files
// and segments its WFDB header names, a trial file with the records its steps
// name, and the --force flag of every command that writes a file.
#pragma once

#include <CLI/CLI.hpp>
#include <filesystem>
#include <string>

#include "breathbeat/io/output_check.hpp"
#include "breathbeat/trial/trial.hpp"

namespace bb::cli {

// Adds --force ("replace an existing output file") to a writing command.
void add_force_flag(CLI::App* app, bool& force, const std::string& help = "");

// -o,--output FILE of a command that writes a file (the name `report` and `wave` use), with the
// old spelling --out of `wave synth` and `wave convert` kept as a hidden alias.
struct OutputOption {
  std::string path;
  std::string old_spelling;  // --out
  CLI::Option* old_option = nullptr;
};
void add_output_option(CLI::App* app, OutputOption& out, const std::string& help);
// In the command's callback: takes --out into `path` with a one-line note on stderr; InputError
// (exit 2) when both or, `required`, neither were given.
void resolve_output_option(OutputOption& out, bool required, const std::string& expected);

// What may happen to an existing output: replaced with --force, else refused.
ExistingOutput existing_output(bool force);

// Adds `record` as an input and, for a WFDB header, every signal file and
// segment header it names (the files the readers open). A header that cannot
// be read adds only itself: reading it fails on its own.
void add_record_inputs(CommandFiles& files, const std::string& option,
                       const std::filesystem::path& record);

// Adds the records named by the trial's steps ([step.waveform] file, relative
// to the trial file), with their WFDB parts.
void add_trial_record_inputs(CommandFiles& files, const Trial& trial);

// True when `path` is a readable file with a `[patient]` table line, the one
// table every trial file has (docs/trial-file.md): a file no report replaces.
bool looks_like_trial_file(const std::filesystem::path& path);

}  // namespace bb::cli
