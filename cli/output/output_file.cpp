#include "output/output_file.hpp"

#include <cerrno>
#include <climits>
#include <cstdlib>
#include <cstring>
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include "strewn/error.hpp"

namespace strewn::cli {
namespace {

[[noreturn]] void cannot_write(const std::string& path, const std::string& why) {
  throw input_error("cannot write '" + path + "': " + why);
}

std::string reason(int err) { return std::strerror(err); }

std::string directory_of(const std::string& path) {
  const auto slash = path.find_last_of('/');
  if (slash == std::string::npos) return ".";
  if (slash == 0) return "/";
  return path.substr(0, slash);
}

std::string base_name(const std::string& path) {
  const auto slash = path.find_last_of('/');
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

std::string resolved(const std::string& path) {
  char buffer[PATH_MAX];
  return ::realpath(path.c_str(), buffer) != nullptr ? std::string(buffer) : std::string();
}

mode_t new_file_mode() {
  const mode_t mask = ::umask(0);
  ::umask(mask);
  return 0666 & ~mask;
}

// Where and how one output goes.
struct Target {
  std::string path;         // as the user wrote it, for messages
  std::string file;         // the file to replace or write: the path with any symbolic link resolved
  bool exists = false;
  bool in_place = false;    // a character device or FIFO: written where it is
  struct stat st {};
};

Target target_of(const std::string& path) {
  Target t;
  t.path = path;
  t.file = path;
  if (path.empty()) cannot_write(path, "empty file name");
  if (path.back() == '/') cannot_write(path, "names a directory");
  struct stat lst {};
  if (::lstat(path.c_str(), &lst) != 0) {
    if (errno != ENOENT) cannot_write(path, reason(errno));
  } else if (S_ISLNK(lst.st_mode)) {
    t.file = resolved(path);
    if (t.file.empty()) cannot_write(path, "it is a symbolic link to a missing file or directory (" + reason(errno) + ")");
  }
  if (::stat(t.file.c_str(), &t.st) == 0) {
    t.exists = true;
    if (S_ISDIR(t.st.st_mode)) cannot_write(path, "is a directory");
    if (S_ISCHR(t.st.st_mode) || S_ISFIFO(t.st.st_mode)) t.in_place = true;
    else if (!S_ISREG(t.st.st_mode))
      cannot_write(path, "is a block device or socket; strewn writes regular files, character devices and FIFOs");
    if (::access(t.file.c_str(), W_OK) != 0) cannot_write(path, reason(errno));
  } else if (errno != ENOENT) {
    cannot_write(path, reason(errno));
  }
  if (!t.in_place) {
    struct stat dir {};
    const std::string d = directory_of(t.file);
    if (::stat(d.c_str(), &dir) != 0) cannot_write(path, "directory '" + d + "': " + reason(errno));
    if (!S_ISDIR(dir.st_mode)) cannot_write(path, "'" + d + "' is not a directory");
  }
  return t;
}

// A key naming one file whether or not it exists yet: device and inode, or the resolved
// directory plus the name.
std::string identity(const Target& t) {
  if (t.exists) return std::to_string(t.st.st_dev) + ":" + std::to_string(t.st.st_ino);
  return resolved(directory_of(t.file)) + "/" + base_name(t.file);
}

bool write_all(int fd, const std::string& content, int& err) {
  std::size_t done = 0;
  while (done < content.size()) {
    const ssize_t n = ::write(fd, content.data() + done, content.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      err = errno;
      return false;
    }
    done += static_cast<std::size_t>(n);
  }
  return true;
}

struct Prepared {
  Target target;
  const std::string* content = nullptr;
  std::string temporary;  // regular files: the fsynced temporary beside the target
  int fd = -1;            // special files: open for writing
};

void discard(std::vector<Prepared>& all) {
  for (Prepared& p : all) {
    if (!p.temporary.empty()) ::unlink(p.temporary.c_str());
    if (p.fd >= 0) ::close(p.fd);
    p.temporary.clear();
    p.fd = -1;
  }
}

void prepare_regular(Prepared& p) {
  const Target& t = p.target;
  std::string name = directory_of(t.file) + "/." + base_name(t.file) + ".strewn-XXXXXX";
  const int fd = ::mkostemp(&name[0], O_CLOEXEC);  // O_CREAT | O_EXCL: never an existing name or link
  if (fd < 0) cannot_write(t.path, "cannot create a temporary file in '" + directory_of(t.file) + "': " + reason(errno));
  p.temporary = name;
  int err = 0;
  const mode_t mode = t.exists ? (t.st.st_mode & 07777) : new_file_mode();
  if (t.exists && ::geteuid() == 0) {
    // Keep the owner of a file root rewrites; as another user, this would only fail.
    [[maybe_unused]] const int owned = ::fchown(fd, t.st.st_uid, t.st.st_gid);
  }
  bool ok = ::fchmod(fd, mode) == 0 || (err = errno, false);
  ok = ok && write_all(fd, *p.content, err);
  ok = ok && (::fsync(fd) == 0 || (err = errno, false));
  if (::close(fd) != 0 && ok) {
    err = errno;
    ok = false;
  }
  if (!ok) cannot_write(t.path, reason(err));
}

void open_special(Prepared& p) {
  const Target& t = p.target;
  // No O_CREAT, no O_TRUNC; O_NONBLOCK so that a FIFO without a reader fails (ENXIO) instead of
  // waiting for ever.
  const int fd = ::open(t.file.c_str(), O_WRONLY | O_NOCTTY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) {
    if (errno == ENXIO && S_ISFIFO(t.st.st_mode)) cannot_write(t.path, "it is a FIFO and nothing reads from it");
    cannot_write(t.path, reason(errno));
  }
  p.fd = fd;
  const int flags = ::fcntl(fd, F_GETFL);
  if (flags >= 0) ::fcntl(fd, F_SETFL, flags & ~O_NONBLOCK);
}

void sync_directory(const std::string& dir) {
  const int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return;
  ::fsync(fd);  // best effort: the renames are done either way
  ::close(fd);
}

}  // namespace

void check_outputs(const std::vector<std::string>& outputs, const std::vector<std::string>& inputs) {
  std::vector<std::pair<dev_t, ino_t>> input_ids;
  std::vector<std::string> input_names;
  for (const std::string& in : inputs) {
    struct stat st {};
    if (in.empty() || ::stat(in.c_str(), &st) != 0) continue;
    input_ids.emplace_back(st.st_dev, st.st_ino);
    input_names.push_back(in);
  }
  std::vector<std::pair<std::string, std::string>> seen;  // identity, path
  for (const std::string& out : outputs) {
    if (out.empty()) continue;
    const Target t = target_of(out);
    if (t.exists && !t.in_place)
      for (std::size_t i = 0; i < input_ids.size(); ++i)
        if (input_ids[i] == std::make_pair(t.st.st_dev, t.st.st_ino))
          throw input_error("output '" + out + "' is the input '" + input_names[i] +
                            "' of this run; writing it would destroy that input: choose another name");
    const std::string id = identity(t);
    for (const auto& [other_id, other] : seen)
      if (other_id == id && !t.in_place)
        throw input_error("outputs '" + other + "' and '" + out + "' name the same file");
    seen.emplace_back(id, out);
  }
}

void write_outputs(const std::vector<OutputFile>& files) {
  std::vector<Prepared> all;
  all.reserve(files.size());
  try {
    for (const OutputFile& f : files) all.push_back({target_of(f.path), &f.content, {}, -1});
    for (Prepared& p : all)
      if (!p.target.in_place) prepare_regular(p);
    for (Prepared& p : all)
      if (p.target.in_place) open_special(p);
    for (Prepared& p : all) {
      if (!p.target.in_place) continue;
      int err = 0;
      if (!write_all(p.fd, *p.content, err)) cannot_write(p.target.path, reason(err));
      const int fd = p.fd;
      p.fd = -1;
      if (::close(fd) != 0 && errno != EINTR) cannot_write(p.target.path, reason(errno));
    }
    for (Prepared& p : all) {
      if (p.target.in_place) continue;
      if (::rename(p.temporary.c_str(), p.target.file.c_str()) != 0) cannot_write(p.target.path, reason(errno));
      p.temporary.clear();
      sync_directory(directory_of(p.target.file));
    }
  } catch (...) {
    discard(all);
    throw;
  }
}

void write_file_atomically(const std::string& path, const std::string& content) {
  write_outputs({{path, content}});
}

}  // namespace strewn::cli
