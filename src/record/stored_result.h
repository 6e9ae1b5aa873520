// Reading the stored result of a run (runs.result_json: sample, coefficients, statistics,
// reading, preparation, warnings, rolling) as the document the engine writes, checked field by
// field, so that every command can read it by key without further checks.
//
// Throws StoredTextError (Failure::corruption, record/stored_text.h) naming the run and the
// field for text that is not JSON, a missing key, a value of the wrong type, an unknown name or
// a negative count. Runs recorded before engine 0.2.0 have no "rolling" key.
#pragma once

#include <cstdint>
#include <nlohmann/json.hpp>
#include <string_view>

namespace alphatrail::record {

// Returns the stored result of run `run_id` as a document, every field checked.
nlohmann::ordered_json read_result(std::int64_t run_id, std::string_view text);

}  // namespace alphatrail::record
