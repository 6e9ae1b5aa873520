// Text typed on the command line that the ledger stores (series, set and curve names, tenors,
// notes, study names), checked against the rules of core/text.h where it enters, so that a bad
// byte is a usage error naming the option before the ledger is opened.
#pragma once

#include <string_view>

namespace alphatrail::cli {

// Throws Error(usage) "OPTION: problem (fix)" when the value is not storable text.
// Example: require_storable_text("--note", "revis\xe9") throws
//          "--note: byte 6 is not valid UTF-8 (0xe9) (write the text in UTF-8)"
void require_storable_text(std::string_view option, std::string_view value);

// Throws Error(usage) as require_storable_text does, and also for a blank name or one that
// begins or ends with white space.
// Example: require_storable_name("--name", "   ") throws
//          "--name: the name is blank (give a name with at least one visible character)"
void require_storable_name(std::string_view option, std::string_view value);

}  // namespace alphatrail::cli
