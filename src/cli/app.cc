#include "cli/app.h"

namespace alphatrail::cli {

int run_app(int /*argc*/, char** /*argv*/) { return 0; }

}  // namespace alphatrail::cli
