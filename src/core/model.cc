#include "core/model.h"

#include <fmt/format.h>

#include <utility>

#include "core/error.h"

namespace alphatrail::core {

bool is_factor_loading(const ModelTerm& term) {
  return term.role == TermRole::factor;
}

std::string term_name(TermRole role, const std::string& factor_name) {
  switch (role) {
    case TermRole::intercept: return "alpha";
    case TermRole::market: return "beta";
    case TermRole::factor: return factor_name;
  }
  return factor_name;
}

void ModelSpec::add(TermRole role, std::string name) {
  names_.push_back(name);
  terms_.push_back({role, std::move(name)});
}

ModelSpec ModelSpec::single_index() {
  return with_factors({});
}

ModelSpec ModelSpec::with_factors(const std::vector<std::string>& factor_names) {
  ModelSpec spec;
  spec.add(TermRole::intercept, term_name(TermRole::intercept));
  spec.add(TermRole::market, term_name(TermRole::market));
  for (const auto& name : factor_names)
    spec.add(TermRole::factor, term_name(TermRole::factor, name));
  return spec;
}

std::vector<std::string> ModelSpec::factor_names() const {
  std::vector<std::string> out;
  for (const auto& term : terms_)
    if (term.role == TermRole::factor) out.push_back(term.name);
  return out;
}

std::optional<std::size_t> ModelSpec::find(TermRole role) const {
  for (std::size_t j = 0; j < terms_.size(); ++j)
    if (terms_[j].role == role) return j;
  return std::nullopt;
}

std::size_t ModelSpec::index_of(TermRole role) const {
  if (auto j = find(role)) return *j;
  throw Error(Failure::internal, fmt::format("the model has no {} term", role_name(role)));
}

const Coefficient& coefficient(const OlsResult& fit, const ModelSpec& spec, TermRole role) {
  // A result whose spec is not the one it was fitted with would name the wrong coefficient.
  if (fit.coefficients.size() != spec.size())
    throw Error(Failure::internal, fmt::format("the fit has {} coefficients but the model {} terms",
                                               fit.coefficients.size(), spec.size()));
  return fit.coefficients[spec.index_of(role)];
}

Eigen::MatrixXd design_matrix(const ModelSpec& spec, const Aligned& sample) {
  const auto T = static_cast<Eigen::Index>(sample.keys->size());
  Eigen::MatrixXd X(T, static_cast<Eigen::Index>(spec.size()));
  for (std::size_t j = 0; j < spec.size(); ++j) {
    const ModelTerm& term = spec.terms()[j];
    auto column = X.col(static_cast<Eigen::Index>(j));
    switch (term.role) {
      case TermRole::intercept: column.setOnes(); break;
      case TermRole::market: {
        const auto& m = sample.column(kBenchmarkColumn);
        const auto& rf = sample.column(kRateColumn);
        for (Eigen::Index t = 0; t < T; ++t) column(t) = m[t] - rf[t];
        break;
      }
      case TermRole::factor: {
        const auto& f = sample.column(term.name);
        for (Eigen::Index t = 0; t < T; ++t) column(t) = f[t];
        break;
      }
    }
  }
  return X;
}

}  // namespace alphatrail::core
