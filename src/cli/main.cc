#include "cli/app.h"

int main(int argc, char** argv) {
  return alphatrail::cli::run_app(argc, argv);
}
