// The plain-language reading of an evaluation: exposure to the market (beta), alpha's size and
// significance, the factor loadings, the sample and multiple-trial warnings, and the cautions
// that go with every result. Pure text from a result the Evaluator made; the ledger supplies
// the context only it knows (the study and the runs recorded before).
//
// Alpha, beta and the factor loadings are found through the result's model spec (model.h) by
// role, not by column. The text is part of the stored run record: it must not change by a byte
// for the same result.
//
// Failure: compose_reading throws alphatrail::Error(Failure::internal) when the result's model
// spec lacks an intercept or a market term or does not match its fit (a result not made by the
// Evaluator). standard_cautions does not fail.
#pragma once

#include <string>
#include <vector>

namespace alphatrail::core {

struct EvaluationResult;    // core/evaluation.h
struct EvaluationSettings;  // core/evaluation.h

// Context for the plain-language reading that only the ledger knows.
struct ReadingContext {
  std::string study;      // empty when the run belongs to no study
  int study_trials = 0;   // runs of this study in the ledger, this one included
  int strategy_runs = 0;  // runs of this strategy in the ledger, this one included
};

// Returns the plain-language reading of a result: exposure, alpha's size and significance,
// sample and multiple-trial warnings, and the cautions.
std::vector<std::string> compose_reading(const EvaluationResult& result,
                                         const EvaluationSettings& settings,
                                         const ReadingContext& context);

// The cautions that go with every result that could lead someone to risk money.
const std::vector<std::string>& standard_cautions();

}  // namespace alphatrail::core
