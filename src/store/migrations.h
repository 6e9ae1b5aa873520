// The schema migrations embedded in the binary from migrations/NNNN_verb_noun.sql.
#pragma once

#include <string>
#include <vector>

namespace alphatrail::store {

struct Migration {
  std::string file;  // e.g. "0001_create_series.sql"; its number is the user_version it sets
  std::string sql;
};

// Returns the migrations in order; migration i (0-based) brings the ledger to version i + 1.
const std::vector<Migration>& embedded_migrations();

}  // namespace alphatrail::store
