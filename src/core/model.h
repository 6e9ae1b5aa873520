// The model specification of a regression: the ordered terms of the design, each with a typed
// role (the intercept alpha, the market's beta, a factor's loading), so that alpha, beta and the
// factor loadings are found by what they are rather than by their column. Pure computation: the
// Evaluator owns the spec of its runs and hands a copy to each EvaluationResult; the design
// matrix is filled from the spec and the aligned sample.
//
// Column order (and so coefficient order, and the order runs are stored in) is the order of the
// terms: intercept, market, then the factors as given. The spec fixes it; nothing else does.
//
// Failure: looking up a role the spec does not hold, or a fit that does not match the spec,
// throws alphatrail::Error(Failure::internal) (a programming error, not a data problem); filling
// the design throws Error(Failure::internal) when the sample lacks a column the spec needs.
#pragma once

#include <Eigen/Dense>
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/align.h"
#include "core/regression.h"
#include "core/vocabulary.h"

namespace alphatrail::core {

// What a term of the model is.
//
// Extension point: a new kind of term (e.g. a market-timing term `timing`, the squared market
// excess return of Treynor & Mazuy 1966, named "gamma") is added here, and then every `switch`
// on TermRole stops compiling without a case for it (-Wswitch; the switches have no default on
// purpose): term_name, design_matrix (its column: (r_m - r_f)^2, computed as
// x * x from the same x as the market column), and in reading.cc whether the sentence "explained
// by the market and the factors" counts it. A builder (e.g. ModelSpec::with_timing) appends the
// term; is_factor_loading stays false for it, so the reading does not list it as a loading. Its
// name for messages is a row in kTermRoles (no switch: VocabularyTest lists the roles).
// Runs without the new term keep their bits: the existing specs and columns do not change.
enum class TermRole { intercept, market, factor };

// The roles' names for messages.
inline constexpr auto kTermRoles = vocabulary<Word<TermRole>>({
    {TermRole::intercept, "intercept"},
    {TermRole::market, "market"},
    {TermRole::factor, "factor"},
});

// Returns the role's name: "intercept", "market", "factor".
inline const char* role_name(TermRole role) {
  return kTermRoles.name(role);
}

struct ModelTerm {
  TermRole role = TermRole::factor;
  std::string name;  // "alpha" (intercept), "beta" (market), the factor's term name (factor)

  bool operator==(const ModelTerm&) const = default;
};

// True for the terms the reading lists as factor loadings (by role, not by position).
bool is_factor_loading(const ModelTerm& term);

// The aligned sample's columns the design reads: the market excess return is benchmark - rate;
// each factor is read from the column named as its term.
inline constexpr char kBenchmarkColumn[] = "benchmark";
inline constexpr char kRateColumn[] = "rate";

class ModelSpec {
 public:
  ModelSpec() = default;  // no terms; only for default-constructed results

  // The single-index model: alpha + beta (r_m - r_f).
  // Example: ModelSpec::single_index().term_names() == {"alpha", "beta"}.
  static ModelSpec single_index();
  // The single-index model plus one factor term per name, in the order given.
  // Example: ModelSpec::with_factors({"SMB", "HML"}).term_names() == {"alpha", "beta", "SMB",
  //          "HML"}.
  static ModelSpec with_factors(const std::vector<std::string>& factor_names);

  const std::vector<ModelTerm>& terms() const { return terms_; }
  std::size_t size() const { return terms_.size(); }
  bool empty() const { return terms_.empty(); }
  // One name per term, in column order (the names fit_ols is given).
  const std::vector<std::string>& term_names() const { return names_; }
  // The names of the factor terms, in order.
  std::vector<std::string> factor_names() const;

  // Returns the column of the first term with the role; nullopt when there is none.
  std::optional<std::size_t> find(TermRole role) const;
  // Returns the column of the first term with the role; throws Error(Failure::internal) when
  // there is none. Example: ModelSpec::single_index().index_of(TermRole::market) == 1.
  std::size_t index_of(TermRole role) const;
  bool has(TermRole role) const { return find(role).has_value(); }

  bool operator==(const ModelSpec&) const = default;

 private:
  void add(TermRole role, std::string name);

  std::vector<ModelTerm> terms_;
  std::vector<std::string> names_;  // kept with the terms: fit_ols takes names on every call
};

// Returns the name a term of the role gets: "alpha", "beta", or the factor's own name.
// Example: term_name(TermRole::factor, "SMB") == "SMB".
std::string term_name(TermRole role, const std::string& factor_name = "");

// Returns the coefficient of the first term with the role. Throws Error(Failure::internal)
// when the spec has no such term or the fit does not have one coefficient per term.
// Example: coefficient(fit, ModelSpec::single_index(), TermRole::intercept).term == "alpha".
const Coefficient& coefficient(const OlsResult& fit, const ModelSpec& spec, TermRole role);

// Returns the design matrix of the spec on the aligned sample: one row per kept period, one
// column per term in order: 1 for the intercept, benchmark - rate for the market, the factor's
// column for a factor. Throws Error(Failure::internal) when the sample lacks a column.
// Example: design_matrix(ModelSpec::single_index(), aligned).col(0) is all ones.
Eigen::MatrixXd design_matrix(const ModelSpec& spec, const Aligned& sample);

}  // namespace alphatrail::core
