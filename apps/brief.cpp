// `emberlith brief`: the briefing pictures of a result folder, rendered by the viewer's batch
// Python (pvbatch) with the same script the plugin's macro uses — one code path, and the
// viewer's renderer. pvbatch needs an X display: without one we give it a private Xvfb
// (share/emberlith/with-xvfb, from scripts/with-xvfb).
#include "result_folder.h"
#include "runner.h"

#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <vector>

namespace fs = std::filesystem;

namespace emberlith
{
namespace
{
// Build and install trees both keep the helpers in ../share/emberlith next to bin/.
fs::path shared_file(const char* name)
{
  std::error_code ec;
  const fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  const fs::path file = exe.parent_path().parent_path() / "share" / "emberlith" / name;
  if (ec || !fs::exists(file))
    throw std::runtime_error("cannot find " + file.string() + " (is Emberlith installed completely?)");
  return file;
}

int run_command(const std::vector<std::string>& args)
{
  std::vector<char*> argv;
  for (const auto& a : args)
    argv.push_back(const_cast<char*>(a.c_str()));
  argv.push_back(nullptr);
  std::fflush(nullptr);
  const pid_t pid = fork();
  if (pid < 0)
    throw std::runtime_error("cannot start " + args.front());
  if (pid == 0)
  {
    execvp(argv[0], argv.data());
    std::fprintf(stderr, "emberlith: cannot run %s (is it installed?)\n", argv[0]);
    _exit(127);
  }
  int status = 0;
  waitpid(pid, &status, 0);
  return WIFEXITED(status) ? WEXITSTATUS(status) : 128;
}
} // namespace

int brief_result(const BriefRequest& request)
{
  if (!fs::exists(request.folder / kProvenanceFile))
    throw std::invalid_argument(request.folder.string() + " is not an Emberlith result folder (no " +
      kProvenanceFile + ")");
  const fs::path out = request.output.empty() ? request.folder / "briefing" : request.output;
  if (fs::exists(out) && !request.force)
    throw OutputExists("briefing folder " + out.string() + " exists; pass --force to replace it");
  fs::remove_all(out);
  std::vector<std::string> args;
  if (!std::getenv("DISPLAY") || !*std::getenv("DISPLAY"))
    args = { shared_file("with-xvfb").string() };
  args.insert(args.end(), { "pvbatch", shared_file("emberlith_briefing.py").string(), request.folder.string(),
    "--output", out.string(), "--cut", request.cut, "--size", request.size, "--fps",
    std::to_string(request.fps) });
  if (!request.isotherms.empty())
    args.insert(args.end(), { "--isotherms", request.isotherms });
  if (!request.title.empty())
    args.insert(args.end(), { "--title", request.title });
  if (request.poster_time)
    args.insert(args.end(), { "--poster-time", std::to_string(*request.poster_time) });
  const int status = run_command(args);
  if (status != 0)
    throw std::runtime_error("the briefing renderer (pvbatch) failed with status " + std::to_string(status));
  std::printf("briefing: %s\n  movie    %s\n  poster   %s\n  curves   %s\n  frames   %s\n",
    fs::absolute(out).c_str(), (fs::absolute(out) / "cooling.mp4").c_str(),
    (fs::absolute(out) / "poster.png").c_str(), (fs::absolute(out) / "cooling_curves.png").c_str(),
    (fs::absolute(out) / "frames").c_str());
  std::printf("%s\n", kCaution);
  return kOk;
}
} // namespace emberlith
