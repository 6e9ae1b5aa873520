#include "support/test_support.h"

#include <fcntl.h>
#include <fmt/format.h>
#include <gtest/gtest.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <cerrno>
#include <cstdlib>
#include <fstream>
#include <random>
#include <sstream>
#include <stdexcept>
#include <thread>

extern char** environ;

namespace alphatrail::testing {

std::filesystem::path source_path(const std::string& relative) {
  return std::filesystem::path(ALPHATRAIL_SOURCE_DIR) / relative;
}

std::filesystem::path nist_path(const std::string& file) {
  return std::filesystem::path(ALPHATRAIL_SOURCE_DIR) / "fixtures" / "nist-strd" / file;
}

ScratchDir::ScratchDir() {
  std::random_device rd;
  auto base = std::filesystem::temp_directory_path();
  for (int attempt = 0; attempt < 100; ++attempt) {
    auto candidate = base / ("alphatrail-test-" + std::to_string(rd()));
    if (std::filesystem::create_directory(candidate)) {
      path_ = candidate;
      return;
    }
  }
  throw std::runtime_error("cannot create a scratch folder");
}

ScratchDir::~ScratchDir() {
  std::error_code ignored;
  std::filesystem::remove_all(path_, ignored);
}

std::filesystem::path ScratchDir::write(const std::string& name, const std::string& text) const {
  auto file = path_ / name;
  std::ofstream out(file, std::ios::binary);
  out << text;
  return file;
}

bool contains(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);) lines.push_back(line);
  return lines;
}

std::string read_file(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

namespace {

std::string drain(int fd) {
  std::string text;
  std::array<char, 65536> buffer{};
  ssize_t n = 0;
  while ((n = read(fd, buffer.data(), buffer.size())) > 0) text.append(buffer.data(), n);
  close(fd);
  return text;
}

}  // namespace

std::string alphatrail_binary() {
  const char* other = std::getenv("ALPHATRAIL_TEST_BINARY");
  return other != nullptr && *other != '\0' ? other : ALPHATRAIL_BINARY;
}

namespace {

// This process's environment without ALPHATRAIL_ variables (tests state theirs), plus `env`.
std::vector<std::string> child_environment(const std::vector<std::string>& env) {
  std::vector<std::string> environment;
  for (char** e = environ; *e != nullptr; ++e) {
    std::string entry = *e;
    if (entry.rfind("ALPHATRAIL_", 0) == 0) continue;
    environment.push_back(entry);
  }
  environment.insert(environment.end(), env.begin(), env.end());
  return environment;
}

pid_t spawn(const std::vector<std::string>& argv, const std::vector<std::string>& env,
            posix_spawn_file_actions_t& actions) {
  std::vector<std::string> environment = child_environment(env);
  std::vector<char*> c_argv;
  for (const auto& a : argv) c_argv.push_back(const_cast<char*>(a.c_str()));
  c_argv.push_back(nullptr);
  std::vector<char*> c_env;
  for (auto& e : environment) c_env.push_back(e.data());
  c_env.push_back(nullptr);
  pid_t pid = 0;
  const int rc = posix_spawn(&pid, c_argv[0], &actions, nullptr, c_argv.data(), c_env.data());
  posix_spawn_file_actions_destroy(&actions);
  if (rc != 0) throw std::runtime_error("cannot start " + argv[0]);
  return pid;
}

}  // namespace

pid_t start_alphatrail(const std::vector<std::string>& args, const std::string& err_file,
                       const std::vector<std::string>& env) {
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 0, "/dev/null", O_RDONLY, 0);
  posix_spawn_file_actions_addopen(&actions, 1, "/dev/null", O_WRONLY, 0);
  posix_spawn_file_actions_addopen(&actions, 2, err_file.c_str(), O_WRONLY | O_CREAT | O_TRUNC,
                                   0644);
  std::vector<std::string> argv{alphatrail_binary()};
  argv.insert(argv.end(), args.begin(), args.end());
  return spawn(argv, env, actions);
}

int wait_for(pid_t pid) {
  int status = 0;
  while (waitpid(pid, &status, 0) < 0 && errno == EINTR) {
  }
  return status;
}

CommandResult run_program(const std::vector<std::string>& argv, const std::vector<std::string>& env,
                          const std::filesystem::path& cwd) {
  int out_pipe[2];
  int err_pipe[2];
  if (pipe(out_pipe) != 0 || pipe(err_pipe) != 0) throw std::runtime_error("pipe failed");

  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 0, "/dev/null", O_RDONLY, 0);
  posix_spawn_file_actions_adddup2(&actions, out_pipe[1], 1);
  posix_spawn_file_actions_adddup2(&actions, err_pipe[1], 2);
  posix_spawn_file_actions_addclose(&actions, out_pipe[0]);
  posix_spawn_file_actions_addclose(&actions, err_pipe[0]);
  if (!cwd.empty()) posix_spawn_file_actions_addchdir_np(&actions, cwd.c_str());
  pid_t pid = 0;
  try {
    pid = spawn(argv, env, actions);
  } catch (...) {
    for (int fd : {out_pipe[0], out_pipe[1], err_pipe[0], err_pipe[1]}) close(fd);
    throw;
  }
  close(out_pipe[1]);
  close(err_pipe[1]);

  CommandResult result;
  std::thread err_reader([&] { result.err = drain(err_pipe[0]); });
  result.out = drain(out_pipe[0]);
  err_reader.join();
  int status = 0;
  waitpid(pid, &status, 0);
  result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
  return result;
}

CommandResult run_alphatrail(const std::vector<std::string>& args,
                             const std::vector<std::string>& env,
                             const std::filesystem::path& cwd) {
  std::vector<std::string> argv{alphatrail_binary()};
  argv.insert(argv.end(), args.begin(), args.end());
  return run_program(argv, env, cwd);
}

CommandResult run_at(const std::filesystem::path& ledger, const std::vector<std::string>& args,
                     const std::vector<std::string>& env) {
  std::vector<std::string> all{"--ledger", ledger.string()};
  all.insert(all.end(), args.begin(), args.end());
  return run_alphatrail(all, env);
}

std::vector<std::vector<double>> read_number_rows(const std::filesystem::path& file,
                                                  const std::string& header) {
  std::istringstream in(read_file(file));
  std::string line;
  std::getline(in, line);
  EXPECT_EQ(line, header) << file;
  const auto columns = static_cast<std::size_t>(std::count(header.begin(), header.end(), ',') + 1);
  std::vector<std::vector<double>> rows;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::vector<double> row;
    std::istringstream fields(line);
    for (std::string field; std::getline(fields, field, ',');) row.push_back(std::stod(field));
    EXPECT_EQ(row.size(), columns) << file << ": " << line;
    rows.push_back(row);
  }
  return rows;
}

core::Day month_end(int year, int month) {
  return core::to_day({year, month, core::days_in_month(year, month)});
}

std::vector<core::Day> month_ends(int year, int month, int n) {
  std::vector<core::Day> out;
  for (int i = 0; i < n; ++i) {
    out.push_back(month_end(year, month));
    if (++month == 13) {
      month = 1;
      ++year;
    }
  }
  return out;
}

}  // namespace alphatrail::testing
