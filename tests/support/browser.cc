#include "support/browser.h"

#include <arpa/inet.h>
#include <fcntl.h>
#include <netinet/in.h>
#include <poll.h>
#include <spawn.h>
#include <sys/socket.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <atomic>
#include <cctype>
#include <cerrno>
#include <chrono>
#include <csignal>
#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>
#include <stdexcept>
#include <string_view>
#include <thread>
#include <utility>

#include "support/test_support.h"

extern char** environ;

namespace alphatrail::testing {

namespace {

namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;

constexpr std::chrono::seconds kTimeout{60};

// The flags every start uses. The proxy on the discard port refuses every connection, so an
// external reference fails at once instead of waiting on (or reaching) the network; Chromium
// still lets loopback addresses bypass it.
const std::vector<std::string> kBaseFlags{
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--proxy-server=127.0.0.1:9",
};

// Runs in the page before anything else: records errors from the start, then after the load
// event writes its findings as JSON into <pre id="alphatrail-probe">, which --dump-dom prints.
// Non-ASCII characters and & < > are written as \u escapes so the serialized DOM holds the JSON
// text exactly and no HTML unescaping is needed.
constexpr const char* kProbeScript = R"JS(
(function () {
  var errors = [];
  function url(el) {
    var v = el.currentSrc || el.src || el.href || el.data || '';
    return typeof v === 'object' && v !== null ? v.baseVal : String(v);
  }
  window.addEventListener('error', function (e) {
    var t = e.target;
    if (t && t !== window && t.tagName) {
      errors.push('failed to load <' + t.tagName.toLowerCase() + '> ' + url(t));
    } else {
      errors.push('script error: ' + e.message + ' (' + e.filename + ':' + e.lineno + ')');
    }
  }, true);
  window.addEventListener('unhandledrejection', function (e) {
    errors.push('unhandled rejection: ' + String(e.reason));
  });
  var consoleError = console.error;
  console.error = function () {
    errors.push('console.error: ' + Array.prototype.map.call(arguments, String).join(' '));
    return consoleError.apply(console, arguments);
  };
  window.addEventListener('load', function () {
    var charts = Array.prototype.map.call(document.querySelectorAll('svg[data-chart]'),
      function (svg) {
        var box = svg.getBoundingClientRect();
        var declared = svg.getAttribute('data-marks');
        return {
          kind: svg.getAttribute('data-chart'), width: box.width, height: box.height,
          marks: svg.querySelectorAll('.mark').length,
          declared_marks: declared !== null && /^\s*\d+\s*$/.test(declared)
            ? parseInt(declared, 10) : -1
        };
      });
    // Distinct URLs: a refused file: URL shows up twice.
    var requests = {};
    performance.getEntriesByType('resource').forEach(function (r) {
      if (!/^(data|blob):/.test(r.name)) requests[r.name] = true;
    });
    var text = JSON.stringify({
      errors: errors, external_requests: Object.keys(requests).length, charts: charts, title: document.title
    }).replace(/[&<>\u007f-\uffff]/g, function (c) {
      return '\\u' + ('0000' + c.charCodeAt(0).toString(16)).slice(-4);
    });
    var pre = document.createElement('pre');
    pre.id = 'alphatrail-probe';
    pre.textContent = text;
    (document.body || document.documentElement).appendChild(pre);
  });
})();
)JS";

constexpr const char* kResultOpen = "<pre id=\"alphatrail-probe\">";

fs::path chromium_path() {
  const char* configured = std::getenv("ALPHATRAIL_CHROMIUM");
  return configured != nullptr && *configured != '\0' ? fs::path(configured)
                                                      : fs::path("/usr/bin/chromium");
}

struct BrowserRun {
  int exit_code = -1;
  bool timed_out = false;
  std::string out;
  std::string err;
};

// Runs argv in a process group of its own, so on a timeout the browser and every helper process
// it started die together; helpers still running after the main process exits are killed too.
BrowserRun run_with_timeout(const std::vector<std::string>& argv) {
  int out_pipe[2];
  int err_pipe[2];
  // Close-on-exec, so no other program started meanwhile holds them open; dup2 clears it.
  if (pipe2(out_pipe, O_CLOEXEC) != 0) throw std::runtime_error("pipe failed");
  if (pipe2(err_pipe, O_CLOEXEC) != 0) {
    close(out_pipe[0]);
    close(out_pipe[1]);
    throw std::runtime_error("pipe failed");
  }
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, 0, "/dev/null", O_RDONLY, 0);
  posix_spawn_file_actions_adddup2(&actions, out_pipe[1], 1);
  posix_spawn_file_actions_adddup2(&actions, err_pipe[1], 2);
  posix_spawnattr_t attributes;
  posix_spawnattr_init(&attributes);
  posix_spawnattr_setflags(&attributes, POSIX_SPAWN_SETPGROUP);
  posix_spawnattr_setpgroup(&attributes, 0);

  std::vector<char*> c_argv;
  for (const auto& a : argv) c_argv.push_back(const_cast<char*>(a.c_str()));
  c_argv.push_back(nullptr);
  pid_t pid = 0;
  const int rc = posix_spawn(&pid, c_argv[0], &actions, &attributes, c_argv.data(), environ);
  posix_spawn_file_actions_destroy(&actions);
  posix_spawnattr_destroy(&attributes);
  close(out_pipe[1]);
  close(err_pipe[1]);
  if (rc != 0) {
    close(out_pipe[0]);
    close(err_pipe[0]);
    throw std::runtime_error("cannot start " + argv[0]);
  }

  BrowserRun run;
  const auto deadline = Clock::now() + kTimeout;
  std::array<pollfd, 2> fds{pollfd{out_pipe[0], POLLIN, 0}, pollfd{err_pipe[0], POLLIN, 0}};
  std::array<std::string*, 2> sinks{&run.out, &run.err};
  std::array<char, 65536> buffer{};
  bool exited = false;
  while (!exited || fds[0].fd >= 0 || fds[1].fd >= 0) {
    if (!exited) {
      // WNOWAIT leaves the main process a zombie, so its pid (the group id) stays reserved
      // while the stragglers of its group are killed.
      siginfo_t info{};
      if (waitid(P_PID, pid, &info, WEXITED | WNOHANG | WNOWAIT) == 0 && info.si_pid == pid) {
        exited = true;
        kill(-pid, SIGKILL);
      }
    }
    if (Clock::now() >= deadline) {
      run.timed_out = true;
      kill(-pid, SIGKILL);
      break;
    }
    // With both pipes closed poll only waits, until the main process is seen to exit.
    if (poll(fds.data(), fds.size(), 100) < 0 && errno != EINTR) break;
    for (size_t i = 0; i < fds.size(); ++i) {
      if (fds[i].fd < 0 || fds[i].revents == 0) continue;
      const ssize_t n = read(fds[i].fd, buffer.data(), buffer.size());
      if (n > 0) {
        sinks[i]->append(buffer.data(), static_cast<size_t>(n));
      } else if (n == 0 || errno != EINTR) {
        close(fds[i].fd);
        fds[i].fd = -1;
      }
    }
  }
  for (auto& fd : fds) {
    if (fd.fd >= 0) close(fd.fd);
  }
  int status = 0;
  waitpid(pid, &status, 0);
  run.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
  return run;
}

// Returns the last lines of Chromium's stderr, for messages (the start is D-Bus noise).
std::string tail(const std::string& text) {
  constexpr size_t kKeep = 1500;
  return text.size() <= kKeep ? text : "..." + text.substr(text.size() - kKeep);
}

// Percent-encodes a path for a URL.
std::string url_path(const std::string& path) {
  static constexpr char kHex[] = "0123456789ABCDEF";
  std::string out;
  for (const unsigned char c : path) {
    if (std::isalnum(c) ||
        std::string_view("/-._~").find(static_cast<char>(c)) != std::string_view::npos) {
      out += static_cast<char>(c);
    } else {
      out += '%';
      out += kHex[c >> 4];
      out += kHex[c & 15];
    }
  }
  return out;
}

// Returns the file: URL of a file.
std::string file_url(const fs::path& file) {
  return "file://" + url_path(fs::absolute(file).string());
}

// Runs Chromium with the base flags, a fresh profile and extra, on the URL; throws when it
// cannot run, times out or fails.
std::string run_chromium(const std::vector<std::string>& extra, const std::string& url) {
  const ScratchDir profile;
  std::vector<std::string> argv{chromium_path().string()};
  argv.insert(argv.end(), kBaseFlags.begin(), kBaseFlags.end());
  argv.push_back("--user-data-dir=" + (profile / "profile").string());
  argv.insert(argv.end(), extra.begin(), extra.end());
  argv.push_back(url);
  const BrowserRun run = run_with_timeout(argv);
  if (run.timed_out) {
    throw std::runtime_error("chromium did not finish within " + std::to_string(kTimeout.count()) +
                             " s on " + url + "\n" + tail(run.err));
  }
  if (run.exit_code != 0) {
    throw std::runtime_error("chromium exited with " + std::to_string(run.exit_code) + " on " +
                             url + "\n" + tail(run.err));
  }
  return run.out;
}

// Returns the position of the first tag `<name` (whole name, any case) in html, or npos.
size_t find_tag(const std::string& html, const std::string& name) {
  std::string lower(html.size(), ' ');
  std::transform(html.begin(), html.end(), lower.begin(),
                 [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  const std::string open = "<" + name;
  for (size_t at = lower.find(open); at != std::string::npos; at = lower.find(open, at + 1)) {
    const size_t next = at + open.size();
    if (next == lower.size() || lower[next] == '>' || lower[next] == '/' ||
        std::isspace(static_cast<unsigned char>(lower[next]))) {
      return at;
    }
  }
  return std::string::npos;
}

// Returns the page with the probe script as the first thing in <head> (after <html> or the
// doctype when there is no <head>; never before the doctype, which would switch to quirks
// mode).
std::string with_probe(const std::string& html) {
  const std::string injected = "<script>" + std::string(kProbeScript) + "</script>";
  size_t at = std::string::npos;
  for (const char* tag : {"head", "html", "!doctype"}) {
    at = find_tag(html, tag);
    if (at != std::string::npos) break;
  }
  size_t insert_at = 0;
  if (at != std::string::npos) {
    const size_t close = html.find('>', at);
    insert_at = close == std::string::npos ? html.size() : close + 1;
  }
  return html.substr(0, insert_at) + injected + html.substr(insert_at);
}

// Serves one folder over HTTP on a loopback port for the life of the object, with one file
// replaced by given text: Chromium reports no resource timing for file: URLs, so pages are
// probed over HTTP, where every fetch is counted. Each connection gets a thread; the
// destructor stops accepting and joins them all.
class FolderServer {
 public:
  FolderServer(fs::path root, std::string replaced_name, std::string replaced_text)
      : root_(fs::weakly_canonical(root)),
        replaced_name_(std::move(replaced_name)),
        replaced_text_(std::move(replaced_text)) {
    listener_ = socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
    if (listener_ < 0) throw std::runtime_error("socket failed");
    sockaddr_in address{};
    address.sin_family = AF_INET;
    address.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
    address.sin_port = 0;  // any free port
    socklen_t length = sizeof address;
    if (bind(listener_, reinterpret_cast<sockaddr*>(&address), sizeof address) != 0 ||
        listen(listener_, 16) != 0 ||
        getsockname(listener_, reinterpret_cast<sockaddr*>(&address), &length) != 0) {
      close(listener_);
      throw std::runtime_error("cannot listen on a loopback port");
    }
    port_ = ntohs(address.sin_port);
    acceptor_ = std::thread([this] { accept_loop(); });
  }

  ~FolderServer() {
    stop_ = true;
    acceptor_.join();
    for (auto& t : connections_) t.join();
    close(listener_);
  }

  FolderServer(const FolderServer&) = delete;
  FolderServer& operator=(const FolderServer&) = delete;

  // Returns the URL of a file in the folder, e.g. http://127.0.0.1:40123/report.html.
  std::string url(const std::string& name) const {
    return "http://127.0.0.1:" + std::to_string(port_) + "/" + url_path(name);
  }

 private:
  void accept_loop() {
    while (!stop_) {
      pollfd listening{listener_, POLLIN, 0};
      if (poll(&listening, 1, 50) <= 0) continue;
      const int connection = accept4(listener_, nullptr, nullptr, SOCK_CLOEXEC);
      if (connection >= 0) connections_.emplace_back([this, connection] { answer(connection); });
    }
  }

  // Answers one GET (Connection: close). Chromium may open a connection it never uses, so a
  // request that does not arrive in time, or the server stopping, just closes it.
  void answer(int connection) {
    std::string request;
    std::array<char, 4096> buffer{};
    const auto give_up = Clock::now() + std::chrono::seconds(10);
    while (request.find("\r\n\r\n") == std::string::npos && !stop_ && Clock::now() < give_up) {
      pollfd readable{connection, POLLIN, 0};
      if (poll(&readable, 1, 50) <= 0) continue;
      const ssize_t n = recv(connection, buffer.data(), buffer.size(), 0);
      if (n <= 0) break;
      request.append(buffer.data(), static_cast<size_t>(n));
    }
    if (request.find("\r\n\r\n") != std::string::npos) {
      const std::string response = respond(request);
      for (size_t sent = 0; sent < response.size();) {
        const ssize_t n =
            send(connection, response.data() + sent, response.size() - sent, MSG_NOSIGNAL);
        if (n <= 0) break;
        sent += static_cast<size_t>(n);
      }
    }
    close(connection);
  }

  std::string respond(const std::string& request) const {
    // "GET /path?query HTTP/1.1": the path, decoded, below the root or not served.
    const size_t method_end = request.find(' ');
    const size_t target_end = request.find_first_of(" ?#\r", method_end + 1);
    const std::string method = request.substr(0, method_end);
    if (method_end == std::string::npos || target_end == std::string::npos ||
        (method != "GET" && method != "HEAD")) {
      return "HTTP/1.1 405 Method Not Allowed\r\nContent-Length: 0\r\nConnection: close\r\n\r\n";
    }
    const std::string name =
        url_decode(request.substr(method_end + 2, target_end - method_end - 2));
    std::string body;
    bool found = false;
    if (name == replaced_name_) {
      body = replaced_text_;
      found = true;
    } else {
      const fs::path file = fs::weakly_canonical(root_ / name);
      const auto [root_end, unused] =
          std::mismatch(root_.begin(), root_.end(), file.begin(), file.end());
      if (root_end == root_.end() && fs::is_regular_file(file)) {
        body = read_file(file);
        found = true;
      }
    }
    const std::string status = found ? "200 OK" : "404 Not Found";
    std::string response = "HTTP/1.1 " + status + "\r\nContent-Type: " + content_type(name) +
                           "\r\nContent-Length: " + std::to_string(found ? body.size() : 0) +
                           "\r\nCache-Control: no-store\r\nConnection: close\r\n\r\n";
    if (found && method == "GET") response += body;
    return response;
  }

  static std::string url_decode(const std::string& text) {
    std::string out;
    for (size_t i = 0; i < text.size(); ++i) {
      if (text[i] == '%' && i + 2 < text.size() &&
          std::isxdigit(static_cast<unsigned char>(text[i + 1])) &&
          std::isxdigit(static_cast<unsigned char>(text[i + 2]))) {
        out += static_cast<char>(std::stoi(text.substr(i + 1, 2), nullptr, 16));
        i += 2;
      } else {
        out += text[i];
      }
    }
    return out;
  }

  // Text is served as UTF-8, what alphatrail writes; without a declared charset a page served
  // over HTTP would be read as windows-1252, where Chromium reads the same file as UTF-8.
  static std::string content_type(const std::string& name) {
    static const std::vector<std::pair<std::string, std::string>> kTypes{
        {".html", "text/html; charset=utf-8"},
        {".htm", "text/html; charset=utf-8"},
        {".css", "text/css; charset=utf-8"},
        {".js", "text/javascript"},
        {".svg", "image/svg+xml"},
        {".png", "image/png"},
        {".jpg", "image/jpeg"},
        {".jpeg", "image/jpeg"},
        {".gif", "image/gif"},
        {".woff2", "font/woff2"},
        {".woff", "font/woff"},
        {".json", "application/json"}};
    const std::string extension = fs::path(name).extension().string();
    for (const auto& [known, type] : kTypes) {
      if (extension == known) return type;
    }
    return "application/octet-stream";
  }

  const fs::path root_;
  const std::string replaced_name_;
  const std::string replaced_text_;
  int listener_ = -1;
  int port_ = 0;
  std::atomic<bool> stop_{false};
  std::thread acceptor_;
  std::vector<std::thread> connections_;  // touched by the acceptor, then by the destructor
};

}  // namespace

bool browser_available() {
  static const bool available = [] {
    const fs::path chromium = chromium_path();
    if (access(chromium.c_str(), X_OK) != 0) return false;
    try {
      return run_with_timeout({chromium.string(), "--version"}).exit_code == 0;
    } catch (const std::runtime_error&) {
      return false;
    }
  }();
  return available;
}

PageProbe probe_page(const fs::path& html, int width, int height) {
  if (!fs::is_regular_file(html)) throw std::runtime_error("no page at " + html.string());
  const fs::path page = fs::absolute(html);
  const FolderServer server(page.parent_path(), page.filename().string(),
                            with_probe(read_file(page)));
  const std::string dom = run_chromium(
      {"--dump-dom", "--window-size=" + std::to_string(width) + "," + std::to_string(height),
       "--hide-scrollbars", "--force-device-scale-factor=1"},
      server.url(page.filename().string()));

  PageProbe probe;
  // The last match: the page's own text cannot come after the element appended at load.
  const size_t open = dom.rfind(kResultOpen);
  if (open == std::string::npos) {
    probe.errors.push_back("the probe did not run: no load event before Chromium dumped the page");
    return probe;
  }
  const size_t start = open + std::string_view(kResultOpen).size();
  const size_t end = dom.find("</pre>", start);
  const auto result = nlohmann::json::parse(dom.substr(start, end - start), nullptr, false);
  if (result.is_discarded()) {
    throw std::runtime_error("cannot parse the probe's result: " + dom.substr(start, end - start));
  }
  probe.loaded = true;
  probe.errors = result.at("errors").get<std::vector<std::string>>();
  probe.external_requests = result.at("external_requests").get<int>();
  probe.title = result.at("title").get<std::string>();
  for (const auto& chart : result.at("charts")) {
    probe.charts.push_back(ChartProbe{
        .kind = chart.at("kind").get<std::string>(),
        .width = chart.at("width").get<double>(),
        .height = chart.at("height").get<double>(),
        .marks = chart.at("marks").get<int>(),
        .declared_marks = chart.at("declared_marks").get<int>(),
    });
  }
  return probe;
}

void save_screenshot(const fs::path& html, const fs::path& png, int width, int height) {
  if (!fs::is_regular_file(html)) throw std::runtime_error("no page at " + html.string());
  const fs::path target = fs::absolute(png);
  std::error_code ignored;
  fs::remove(target, ignored);  // so an old file cannot pass for this one
  run_chromium({"--screenshot=" + target.string(),
                "--window-size=" + std::to_string(width) + "," + std::to_string(height),
                "--hide-scrollbars", "--force-device-scale-factor=1"},
               file_url(html));
  png_size(target);  // throws when Chromium wrote no PNG
}

std::pair<int, int> png_size(const fs::path& png) {
  // Signature (8 bytes), then the IHDR chunk: length (4), type (4), width (4), height (4).
  static constexpr std::array<unsigned char, 8> kSignature{0x89, 'P',  'N',  'G',
                                                           '\r', '\n', 0x1a, '\n'};
  std::ifstream in(png, std::ios::binary);
  std::array<unsigned char, 24> head{};
  if (!in.read(reinterpret_cast<char*>(head.data()), head.size()) ||
      !std::equal(kSignature.begin(), kSignature.end(), head.begin()) ||
      std::string_view(reinterpret_cast<const char*>(head.data()) + 12, 4) != "IHDR") {
    throw std::runtime_error(png.string() + " is not a PNG file");
  }
  const auto big_endian = [&](size_t at) {
    return static_cast<int>((head[at] << 24) | (head[at + 1] << 16) | (head[at + 2] << 8) |
                            head[at + 3]);
  };
  return {big_endian(16), big_endian(20)};
}

}  // namespace alphatrail::testing
