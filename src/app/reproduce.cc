#include "app/reproduce.h"

#include "app/evaluate.h"
#include "record/run_record.h"
#include "record/stored_result.h"
#include "version.h"

namespace alphatrail::app {

ReproduceOutcome reproduce_run(store::Ledger& ledger, std::int64_t run_id) {
  ReproduceOutcome outcome;
  ledger.read_transaction([&] {
    const record::RunRow row = ledger.existing_run_row(run_id);
    auto pending = evaluate_request(ledger, request_from_run(ledger, run_id, true));
    const PendingRun& fresh_run = pending.front();
    outcome.run_id = run_id;
    outcome.strategy = row.strategy;
    outcome.recorded_by_engine = row.engine_version;
    outcome.stored_inputs_hash = row.inputs_hash;
    outcome.recomputed_inputs_hash =
        record::inputs_hash(kEngineVersion, fresh_run.run.parameters_json, fresh_run.run.inputs);

    auto stored = record::read_result(run_id, row.result_json);
    auto fresh = record::result_json(fresh_run.result, {});
    for (auto* result : {&stored, &fresh}) result->erase("reading");
    outcome.differences = json_differences(stored, fresh);
  });
  return outcome;
}

}  // namespace alphatrail::app
