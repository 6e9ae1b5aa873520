#include "app/rerun.h"

#include <cstddef>
#include <utility>

#include "app/evaluate.h"
#include "store/ledger.h"

namespace alphatrail::app {

Verdict verdict(double p_before, double p_after, double alpha_before, double alpha_after,
                double level) {
  // Written as `p < level` on both sides (never `p >= level`), so that a NaN p-value counts
  // as not significant either way.
  Verdict v;
  v.significance_lost = p_before < level && !(p_after < level);
  v.became_significant = !(p_before < level) && p_after < level;
  v.sign_changed = (alpha_before > 0) != (alpha_after > 0);
  return v;
}

Verdict verdict(const RerunOutcome& outcome) {
  return verdict(outcome.before.alpha_p, outcome.after.alpha_p, outcome.before.alpha,
                 outcome.after.alpha, outcome.level);
}

std::vector<std::int64_t> runs_to_rerun(store::Ledger& ledger,
                                        const std::vector<std::int64_t>& named, bool all_stale) {
  if (all_stale) return ledger.unrevised_stale_runs();
  for (auto id : named) ledger.existing_run_row(id);  // each must exist
  return named;
}

std::vector<RerunOutcome> rerun_runs(store::Ledger& ledger, const std::vector<std::int64_t>& ids,
                                     const Progress& progress) {
  std::vector<RerunOutcome> outcomes;
  ledger.write_transaction([&] {
    std::vector<PendingRun> pending;
    for (auto id : ids) {
      auto rq = request_from_run(ledger, id, false);
      rq.revises_run_id = id;
      auto one = evaluate_request(ledger, rq);
      for (auto& p : one) pending.push_back(std::move(p));
    }
    const auto new_ids = record_runs(ledger, pending, progress);
    for (std::size_t i = 0; i < ids.size(); ++i)
      outcomes.push_back({*ledger.read_run_row(ids[i]), *ledger.read_run_row(new_ids[i]),
                          1.0 - pending[i].settings.confidence});
  });
  return outcomes;
}

}  // namespace alphatrail::app
