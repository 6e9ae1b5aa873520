// Options whose value is one of a fixed set of names, parsed straight into the enum (or other
// value) each name stands for. --help shows the names as they are typed, e.g.
// `--errors {classic,hc0,hc1,hc2,hc3,newey-west}=newey-west`, and any other text (a number
// included) is refused as a bad command line (exit 2).
#pragma once

#include <CLI/CLI.hpp>
#include <cstddef>
#include <functional>
#include <string>
#include <utility>
#include <vector>

#include "core/vocabulary.h"

namespace alphatrail::cli {

// The names of an option in the order --help lists them, each with its value.
template <typename T>
using Choices = std::vector<std::pair<std::string, T>>;

// Returns the choices of a vocabulary: its names with their values, in table order.
// Example: choices_of(core::kRateTimings) == Choices<RateTiming>{{"start", ...}, {"end", ...}}.
template <typename Row, std::size_t N>
Choices<typename core::Vocabulary<Row, N>::Value> choices_of(
    const core::Vocabulary<Row, N>& vocabulary) {
  Choices<typename core::Vocabulary<Row, N>::Value> choices;
  for (const Row& row : vocabulary.rows()) choices.emplace_back(row.name, row.value);
  return choices;
}

// Returns the names of a vocabulary as a sentence lists them, for an option's description.
// Example: listed_names(core::kRateBases) == "compound, simple or act360".
template <typename Row, std::size_t N>
std::string listed_names(const core::Vocabulary<Row, N>& vocabulary) {
  std::string text;
  for (std::size_t i = 0; i < N; ++i) {
    if (i > 0) text += i + 1 == N ? " or " : ", ";
    text += vocabulary.rows()[i].name;
  }
  return text;
}

// Adds an option taking one of `choices`; `set` receives the value of the name given.
// `shown_default` is the name --help shows as the default ("" for none); with ignore_case
// "JSON" is taken as "json".
// Example: add_choice_option<Format>(cmd, "--format", {{"table", Format::table}, ...},
//                                    [&](Format f) { format = f; }, "Output", "table");
template <typename T>
CLI::Option* add_choice_option(CLI::App& command, const std::string& name,
                               const Choices<T>& choices, std::function<void(const T&)> set,
                               const std::string& description,
                               const std::string& shown_default = "", bool ignore_case = false) {
  std::vector<std::string> names;
  for (const auto& c : choices) names.push_back(c.first);
  auto* option = command.add_option_function<std::string>(
      name,
      [choices, set](const std::string& text) {
        for (const auto& [choice, value] : choices)
          if (choice == text) return set(value);
        throw CLI::ValidationError(text + " is not one of the choices");  // not reached
      },
      description);
  // A transform, not a check: ignoring case it also turns the text into the name matched.
  option->transform(ignore_case ? CLI::IsMember(names, CLI::ignore_case).description("")
                                : CLI::IsMember(names).description(""));
  option->type_name("{" + CLI::detail::join(names, ",") + "}");
  if (!shown_default.empty()) option->default_str(shown_default);
  return option;
}

// Adds an option taking one of `choices` into `target`, which holds the default.
template <typename T>
CLI::Option* add_choice_option(CLI::App& command, const std::string& name, T& target,
                               const Choices<T>& choices, const std::string& description) {
  std::string shown;
  for (const auto& [choice, value] : choices)
    if (value == target) shown = choice;
  return add_choice_option<T>(
      command, name, choices, [&target](const T& v) { target = v; }, description, shown);
}

}  // namespace alphatrail::cli
