// The plugin host: loads shape modules through the C ABI of strewn/plugin.h and builds regions
// from the loops they emit. Nothing a plugin does on the C side is trusted: tables are checked
// for size and ABI version, strings for presence, parameters against the plugin's own
// description, and the emitted geometry for validity.
#include <dirent.h>
#include <dlfcn.h>
#include <elf.h>
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <climits>
#include <limits>
#include <cmath>
#include <cstdlib>
#include <cerrno>
#include <cstdint>
#include <cstring>
#include <map>
#include <set>
#include <nlohmann/json.hpp>
#include <sstream>

#include <sys/stat.h>
#include "geometry/nesting_scan.hpp"
#include "shapes/parameter_check.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/input_file.hpp"
#include "strewn/position_text.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/plugin.h"
#include "strewn/region_ops.hpp"
#include "strewn/shape_registry.hpp"

namespace strewn {
namespace {

constexpr int kMaxCompositeDepth = 16;
// The fields of strewn_shape_kind this host reads.
constexpr std::size_t kMinKindSize = offsetof(strewn_shape_kind, build) + sizeof(strewn_build_fn);

std::string directory_of(const std::string& path) {
  const auto slash = path.find_last_of('/');
  return slash == std::string::npos ? std::string(".") : path.substr(0, slash);
}

std::string executable_directory() {
  char buffer[PATH_MAX];
  const ssize_t n = readlink("/proc/self/exe", buffer, sizeof(buffer) - 1);
  if (n <= 0) return {};
  buffer[n] = '\0';
  return directory_of(buffer);
}

std::string library_directory() {
  Dl_info info;
  if (dladdr(reinterpret_cast<void*>(&closest_names), &info) == 0 || info.dli_fname == nullptr)
    return {};
  return directory_of(info.dli_fname);
}

bool valid_kind_name(const char* name) {
  if (name == nullptr || *name == '\0') return false;
  for (const char* c = name; *c; ++c)
    if (!((*c >= 'a' && *c <= 'z') || (*c >= '0' && *c <= '9') || *c == '_')) return false;
  return true;
}

struct KindEntry {
  ShapeKindInfo info;
  nlohmann::json description;
  strewn_build_fn build = nullptr;
};


// What a module file says before anything of it runs: dlopen() runs a module's constructors, so
// the file is checked first. Only a regular file is opened (a FIFO or device would block or
// never end), and a 64-bit ELF shared object for this machine is read for the entry symbol in
// its dynamic symbol table. Returns an empty string when the file may be loaded, else why not.
// A shared object without section headers cannot be checked here; dlsym() checks it after
// loading.
class FileCloser {
 public:
  explicit FileCloser(int fd) : fd_(fd) {}
  ~FileCloser() {
    if (fd_ >= 0) close(fd_);
  }
  FileCloser(const FileCloser&) = delete;
  FileCloser& operator=(const FileCloser&) = delete;

 private:
  int fd_;
};

bool read_at(int fd, void* to, std::size_t size, std::uint64_t offset, std::uint64_t file_size) {
  if (offset > file_size || size > file_size - offset) return false;
  auto* p = static_cast<char*>(to);
  while (size > 0) {
    const ssize_t n = pread(fd, p, size, static_cast<off_t>(offset));
    if (n <= 0) return false;
    p += n;
    size -= static_cast<std::size_t>(n);
    offset += static_cast<std::uint64_t>(n);
  }
  return true;
}

std::string module_file_fault(const std::string& path) {
  const int fd = open(path.c_str(), O_RDONLY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) return std::string("cannot open: ") + std::strerror(errno);
  const FileCloser closer(fd);
  struct stat st {};
  if (fstat(fd, &st) != 0) return std::string("cannot read: ") + std::strerror(errno);
  if (!S_ISREG(st.st_mode)) return "not a regular file";
  const auto size = static_cast<std::uint64_t>(st.st_size);
  Elf64_Ehdr h{};
  if (!read_at(fd, &h, sizeof(h), 0, size) || std::memcmp(h.e_ident, ELFMAG, SELFMAG) != 0)
    return "not an ELF shared object";
  if (h.e_ident[EI_CLASS] != ELFCLASS64 || h.e_type != ET_DYN) return "not a 64-bit ELF shared object";
#if defined(__x86_64__)
  if (h.e_machine != EM_X86_64) return "a shared object for another machine";
#elif defined(__aarch64__)
  if (h.e_machine != EM_AARCH64) return "a shared object for another machine";
#endif
#if __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
  if (h.e_ident[EI_DATA] != ELFDATA2LSB) return "a shared object of the other byte order";
#else
  if (h.e_ident[EI_DATA] != ELFDATA2MSB) return "a shared object of the other byte order";
#endif
  if (h.e_shoff == 0 || h.e_shnum == 0 || h.e_shentsize != sizeof(Elf64_Shdr)) return {};  // dlsym checks
  std::vector<Elf64_Shdr> sections(h.e_shnum);
  if (!read_at(fd, sections.data(), sections.size() * sizeof(Elf64_Shdr), h.e_shoff, size))
    return "a truncated ELF file (section headers)";
  constexpr std::uint64_t kMaxTable = 64u << 20;  // no plugin's dynamic symbols come near this
  for (const Elf64_Shdr& sym : sections) {
    if (sym.sh_type != SHT_DYNSYM) continue;
    if (sym.sh_link >= sections.size() || sym.sh_entsize != sizeof(Elf64_Sym) || sym.sh_size > kMaxTable)
      return "a malformed ELF dynamic symbol table";
    const Elf64_Shdr& str = sections[sym.sh_link];
    if (str.sh_size > kMaxTable) return "a malformed ELF dynamic string table";
    std::vector<Elf64_Sym> symbols(sym.sh_size / sizeof(Elf64_Sym));
    std::string names(str.sh_size, '\0');
    if (!read_at(fd, symbols.data(), symbols.size() * sizeof(Elf64_Sym), sym.sh_offset, size) ||
        !read_at(fd, names.data(), names.size(), str.sh_offset, size))
      return "a truncated ELF file (dynamic symbols)";
    const std::string wanted = STREWN_PLUGIN_ENTRY_SYMBOL;
    for (const Elf64_Sym& y : symbols) {
      if (y.st_name >= names.size() || y.st_shndx == SHN_UNDEF) continue;
      const int binding = ELF64_ST_BIND(y.st_info);
      if (binding != STB_GLOBAL && binding != STB_WEAK) continue;
      if (names.compare(y.st_name, wanted.size() + 1, wanted.c_str(), wanted.size() + 1) == 0) return {};
    }
    return "no entry symbol '" STREWN_PLUGIN_ENTRY_SYMBOL "' (not a strewn shape plugin; nothing of it was run)";
  }
  return "no dynamic symbol table (not a strewn shape plugin; nothing of it was run)";
}

}  // namespace

struct ShapeRegistry::Impl {
  std::vector<void*> handles;
  std::map<std::string, KindEntry> kinds;
  std::map<std::string, std::string> former_kinds;  // former name -> current name ("former_kind")
  std::vector<std::string> warnings;

  ~Impl() {
    for (void* h : handles) dlclose(h);
  }

  Region build(const std::string& kind, const std::string& params_json,
               const BuildOptions& options, int depth) const;
};

namespace {

// State behind the sink handed to a plugin's build function.
struct SinkState {
  SinkState(const ShapeRegistry::Impl* h, std::string k, BuildOptions o, int d)
      : host(h), kind(std::move(k)), options(o), depth(d) {}
  const ShapeRegistry::Impl* host;
  std::string kind;
  BuildOptions options;
  int depth;
  std::vector<Loop> loops;
  Region combined;  // result of combine() calls so far
  bool has_combined = false;
  Loop current;
  bool open = false;
  Vec2 start = Vec2::Zero();
  Vec2 pen = Vec2::Zero();
  // Points of the open loop taken as the pen's own (same_point): the widest such distance (m),
  // named when the loop is left with no edges.
  double merged_within = 0.0;
  std::string error;
  // Why a combination came out empty when its operands plainly left nothing (not a sliver
  // lost to chords): said instead of the chords' message.
  std::string emptied;

  int fail(const std::string& message) {
    if (error.empty()) error = message;
    return 1;
  }
};

SinkState& state(void* p) { return *static_cast<SinkState*>(p); }

// Points closer than the rounding of their coordinates (32 ulps of their distance from the
// origin, 7e-15 of it) are one point: a plugin's own cos and sin of a joint need not give the
// host's bits. Wider, it dropped real edges: at 1e-12 a ring sector 7e-7 m wide at a UTM
// site (5.4e6 m: 5.4e-6 m) lost its radial ends and was refused as "not closed" (the
// region's closure check allows 64 ulps of the largest coordinate, which this stays within).
constexpr double kSamePoint = 32 * std::numeric_limits<double>::epsilon();
bool same_point(const Vec2& a, const Vec2& b) {
  return (a - b).norm() <= kSamePoint * std::max({1.0, a.norm(), b.norm()});
}

int sink_begin_loop(void* p, double x, double y) {
  SinkState& s = state(p);
  if (s.open) return s.fail("begin_loop called while a loop is open");
  if (!std::isfinite(x) || !std::isfinite(y)) return s.fail("a loop starts at a non-finite point");
  s.open = true;
  s.current.clear();
  s.merged_within = 0.0;
  s.start = s.pen = Vec2(x, y);
  return 0;
}

int sink_line_to(void* p, double x, double y) {
  SinkState& s = state(p);
  if (!s.open) return s.fail("line_to called outside a loop");
  if (!std::isfinite(x) || !std::isfinite(y)) return s.fail("a segment ends at a non-finite point");
  const Vec2 to(x, y);
  if (!same_point(s.pen, to)) s.current.push_back(Edge::segment(s.pen, to));
  else s.merged_within = std::max(s.merged_within, (to - s.pen).norm());
  s.pen = to;
  return 0;
}

int sink_arc_to(void* p, double cx, double cy, double rx, double ry, double rotation_deg,
                double t_from_deg, double t_to_deg) {
  SinkState& s = state(p);
  if (!s.open) return s.fail("arc_to called outside a loop");
  for (double v : {cx, cy, rx, ry, rotation_deg, t_from_deg, t_to_deg})
    if (!std::isfinite(v)) return s.fail("an arc has a non-finite parameter");
  if (!(rx > 0.0) || !(ry > 0.0)) return s.fail("an arc's semi-axes must be positive");
  const double sweep = t_to_deg - t_from_deg;
  if (sweep == 0.0 || std::fabs(sweep) > 360.0)
    return s.fail("an arc must sweep more than 0 and at most 360 degrees");
  const double r = rotation_deg * kPi / 180.0;
  Mat2 axes;
  axes << rx * std::cos(r), -ry * std::sin(r), rx * std::sin(r), ry * std::cos(r);
  const Edge arc = Edge::arc(Vec2(cx, cy), axes, t_from_deg * kPi / 180.0, t_to_deg * kPi / 180.0);
  if (!same_point(s.pen, arc.from)) s.current.push_back(Edge::segment(s.pen, arc.from));
  s.current.push_back(arc);
  s.pen = arc.to;
  return 0;
}

int sink_end_loop(void* p) {
  SinkState& s = state(p);
  if (!s.open) return s.fail("end_loop called outside a loop");
  if (!same_point(s.pen, s.start)) s.current.push_back(Edge::segment(s.pen, s.start));
  else if (!s.current.empty()) s.current.back().to = s.start;  // close exactly
  if (s.current.empty()) {
    if (!(s.merged_within > 0.0)) return s.fail("a loop has no edges");
    // Points within 7e-15 of their distance from the origin are one point (same_point): far out
    // that is a real length (about 7 mm at 1e12 m), and a small zone there vanishes.
    std::ostringstream m;
    m.precision(3);
    m << "a loop has no edges: its points, " << s.merged_within << " m apart at " << position_text(s.start)
      << ", are one point at coordinates this large (points closer than 7e-15 of their distance from the origin, "
      << kSamePoint * s.start.norm() << " m here, are taken as one); shift the site's coordinates nearer the origin";
    return s.fail(m.str());
  }
  s.loops.push_back(s.current);
  s.current.clear();
  s.open = false;
  return 0;
}

Region emitted_so_far(SinkState& s) {
  Region r;
  if (s.has_combined) r = s.combined;
  for (const Loop& l : s.loops) r.loops.push_back(l);
  s.loops.clear();
  return r.loops.empty() ? r : normalised(r);
}

int sink_combine(void* p, int operation, const char* kind, const char* params_json) {
  SinkState& s = state(p);
  if (s.open) return s.fail("combine called while a loop is open");
  if (kind == nullptr || params_json == nullptr) return s.fail("combine needs a kind and parameters");
  if (operation < STREWN_UNION || operation > STREWN_INTERSECTION)
    return s.fail("combine: unknown operation " + std::to_string(operation));
  try {
    Region part = s.host->build(kind, params_json, s.options, s.depth + 1);
    Region so_far = emitted_so_far(s);
    // (An empty result that lost a sliver to chords is not nothing: it carries its patches on.)
    if (so_far.empty() && so_far.approximation_patches.empty()) {
      // Nothing yet: a union or difference starts from the part (difference from nothing is
      // nothing, which a first part rarely means; treat the first part as the base).
      s.combined = operation == STREWN_INTERSECTION ? Region{} : part;
    } else {
      const BooleanOp op = operation == STREWN_UNION        ? BooleanOp::unite
                           : operation == STREWN_DIFFERENCE ? BooleanOp::subtract
                                                            : BooleanOp::intersect;
      s.combined = combine(so_far, part, op, s.options.sagitta);
      // Operands whose boxes are apart (by more than a thousandth of their size, far above the
      // chords' depth) share nothing: an empty intersection is the input's, not the chords'.
      const BoundingBox a = bounds(so_far), b = bounds(part);
      const double size = std::max((a.max - a.min).norm(), (b.max - b.min).norm());
      const bool apart = a.min.x() > b.max.x() + 1e-3 * size || b.min.x() > a.max.x() + 1e-3 * size ||
                         a.min.y() > b.max.y() + 1e-3 * size || b.min.y() > a.max.y() + 1e-3 * size;
      if (s.combined.empty() && op == BooleanOp::intersect && apart)
        s.emptied = "part '" + std::string(kind) + "' does not meet the parts before it: their intersection is empty";
      else if (!s.combined.empty())
        s.emptied.clear();
    }
    s.has_combined = true;
    return 0;
  } catch (const std::exception& e) {
    return s.fail(e.what());
  }
}

}  // namespace

namespace {

Warning former_kind_warning(const std::string& former, const std::string& now) {
  return {WarningKind::former_name, "shape kind '" + former + "' is the former name of '" + now +
                                        "'; it is read in this release and will be refused in the next"};
}

}  // namespace

Region ShapeRegistry::Impl::build(const std::string& kind, const std::string& params_json,
                                  const BuildOptions& options, int depth) const {
  if (depth > kMaxCompositeDepth)
    throw input_error("shape '" + kind + "': composite shapes nested more than " +
                      std::to_string(kMaxCompositeDepth) + " deep");
  if (const auto renamed = former_kinds.find(kind);
      !kinds.count(kind) && renamed != former_kinds.end() && kinds.count(renamed->second)) {
    if (options.warnings) options.warnings->push_back(former_kind_warning(kind, renamed->second));
    return build(renamed->second, params_json, options, depth);
  }
  const auto it = kinds.find(kind);
  if (it == kinds.end()) {
    std::vector<std::string> names;
    for (const auto& k : kinds) names.push_back(k.first);
    std::string message = "unknown shape kind '" + kind + "'";
    message += did_you_mean(kind, names);
    throw input_error(message);
  }
  const KindEntry& entry = it->second;
  nlohmann::json params;
  detail::check_json_nesting(params_json, "shape '" + kind + "': parameters");
  std::string twice;
  try {
    params = detail::parse_json_once(params_json, twice);
  } catch (const std::exception&) {
    throw input_error("shape '" + kind + "': parameters are not valid JSON");
  }
  if (!twice.empty()) throw input_error("shape '" + kind + "': parameter '" + quoted_excerpt(twice) + "' is given twice");
  detail::rename_former_parameters(kind, entry.description, params, options.warnings);
  detail::check_parameters(kind, entry.description, params);
  const std::string checked = params.dump();

  SinkState st{this, kind, options, depth};
  strewn_sink sink{};
  sink.struct_size = sizeof(strewn_sink);
  sink.user_data = &st;
  sink.begin_loop = sink_begin_loop;
  sink.line_to = sink_line_to;
  sink.arc_to = sink_arc_to;
  sink.end_loop = sink_end_loop;
  sink.combine = sink_combine;
  char error[512] = {0};
  const int status = entry.build(checked.c_str(), &sink, error, sizeof(error));
  error[sizeof(error) - 1] = '\0';
  if (status != STREWN_OK) {
    std::string why = error[0] ? std::string(error) : st.error;
    if (status == STREWN_SINK_REFUSED && !st.error.empty()) why = st.error;
    if (why.empty()) why = "the plugin reported error code " + std::to_string(status);
    throw input_error("shape '" + kind + "': " + why);
  }
  if (!st.error.empty()) throw input_error("shape '" + kind + "': " + st.error);
  if (st.open) throw input_error("shape '" + kind + "': the plugin left a loop open");
  Region region;
  if (st.has_combined) region = st.combined;
  for (const Loop& l : st.loops) region.loops.push_back(l);
  // A boolean whose polygons left nothing may still have lost a thin part of the exact result
  // to the chords: refused as such, not as an empty shape (nor integrated as p = 0).
  if (region.empty() && !st.emptied.empty()) throw input_error("shape '" + kind + "': " + st.emptied);
  if (region.empty() && !region.approximation_patches.empty())
    throw input_error("shape '" + kind + "': nothing is left of the combination once its curves are cut into chords; "
                      "a part thinner than the chords' depth (about 1e-6 of the parts' size) may have been lost");
  if (region.empty()) throw input_error("shape '" + kind + "': the shape is empty");
  const Validity v = check_validity(region);
  if (!v.valid) throw input_error("shape '" + kind + "': invalid geometry: " + v.fault);
  return normalised(std::move(region));
}

ShapeRegistry::ShapeRegistry() : impl_(std::make_unique<Impl>()) {}
ShapeRegistry::~ShapeRegistry() = default;
ShapeRegistry::ShapeRegistry(ShapeRegistry&&) noexcept = default;
ShapeRegistry& ShapeRegistry::operator=(ShapeRegistry&&) noexcept = default;

std::vector<std::string> ShapeRegistry::default_search_path(
    const std::vector<std::string>& extra_dirs) {
  std::vector<std::string> dirs;
  if (const std::string exe = executable_directory(); !exe.empty())
    dirs.push_back(exe + "/" STREWN_PLUGIN_RELATIVE_DIR);
  if (const std::string lib = library_directory(); !lib.empty())
    dirs.push_back(lib + "/strewn/plugins");
  if (const char* env = std::getenv("STREWN_PLUGIN_PATH")) {
    std::stringstream ss(env);
    std::string item;
    while (std::getline(ss, item, ':'))
      if (!item.empty()) dirs.push_back(item);
  }
  dirs.insert(dirs.end(), extra_dirs.begin(), extra_dirs.end());
  return dirs;
}

ShapeRegistry ShapeRegistry::with_default_search_path(const std::vector<std::string>& extra_dirs) {
  ShapeRegistry registry;
  std::vector<std::string> seen;
  for (const std::string& dir : default_search_path(extra_dirs)) {
    char resolved[PATH_MAX];
    const std::string key = realpath(dir.c_str(), resolved) ? std::string(resolved) : dir;
    if (std::find(seen.begin(), seen.end(), key) != seen.end()) continue;
    seen.push_back(key);
    registry.load_directory(dir);
  }
  return registry;
}

void ShapeRegistry::load_module(const std::string& path) {
  if (const std::string fault = module_file_fault(path); !fault.empty())
    throw input_error("cannot load plugin '" + path + "': " + fault);
  void* handle = dlopen(path.c_str(), RTLD_NOW | RTLD_LOCAL);
  if (handle == nullptr) {
    const char* why = dlerror();
    throw input_error("cannot load plugin '" + path + "': " + (why ? why : "unknown reason"));
  }
  auto refuse = [&](const std::string& why) {
    dlclose(handle);
    throw input_error("plugin '" + path + "': " + why);
  };
  void* symbol = dlsym(handle, STREWN_PLUGIN_ENTRY_SYMBOL);
  if (symbol == nullptr)
    refuse("no entry symbol '" STREWN_PLUGIN_ENTRY_SYMBOL "' (not a strewn shape plugin)");
  auto entry_fn = reinterpret_cast<strewn_plugin_entry_fn>(symbol);
  const strewn_shape_kind* const* table = entry_fn();
  if (table == nullptr || table[0] == nullptr) refuse("offers no shape kinds");
  std::vector<KindEntry> accepted;
  for (std::size_t i = 0; table[i] != nullptr; ++i) {
    const strewn_shape_kind* k = table[i];
    if (k->struct_size < kMinKindSize)
      refuse("shape kind table entry " + std::to_string(i + 1) + " is too small (struct_size " +
             std::to_string(k->struct_size) + ")");
    if (k->abi_version != STREWN_PLUGIN_ABI_VERSION)
      refuse("built for plugin ABI version " + std::to_string(k->abi_version) +
             ", this strewn uses version " + std::to_string(STREWN_PLUGIN_ABI_VERSION) +
             "; rebuild it against this strewn's strewn/plugin.h");
    if (!valid_kind_name(k->name))
      refuse("shape kind entry " + std::to_string(i + 1) +
             " has no valid name (lowercase letters, digits and '_')");
    if (k->build == nullptr) refuse("shape kind '" + std::string(k->name) + "' has no build function");
    KindEntry e;
    e.info = {k->name, k->summary ? k->summary : "", k->params_json ? k->params_json : "", path};
    try {
      e.description = nlohmann::json::parse(e.info.params_json);
      if (!e.description.contains("params") || !e.description["params"].is_array())
        throw std::runtime_error("no params array");
      for (const auto& p : e.description["params"]) p.at("name").get<std::string>();
    } catch (const std::exception&) {
      refuse("shape kind '" + e.info.name + "' has a malformed parameter description");
    }
    e.build = k->build;
    accepted.push_back(std::move(e));
  }
  bool used = false;
  for (KindEntry& e : accepted) {
    const auto it = impl_->kinds.find(e.info.name);
    if (it != impl_->kinds.end()) {
      impl_->warnings.push_back("shape kind '" + e.info.name + "' from '" + path +
                                "' ignored: already provided by '" + it->second.info.module_path +
                                "'");
      continue;
    }
    // A renamed kind's former name reads as it (with a warning), unless a kind of that name is loaded.
    if (e.description.contains("former_kind") && e.description["former_kind"].is_string()) {
      const std::string former = e.description["former_kind"];
      if (!former.empty() && former != e.info.name) impl_->former_kinds.emplace(former, e.info.name);
    }
    impl_->kinds.emplace(e.info.name, std::move(e));
    used = true;
  }
  if (used) impl_->handles.push_back(handle);
  else dlclose(handle);
}

void ShapeRegistry::load_directory(const std::string& dir) {
  DIR* d = opendir(dir.c_str());
  if (d == nullptr) return;
  std::vector<std::string> files;
  while (const dirent* ent = readdir(d)) {
    const std::string name = ent->d_name;
    if (name.size() > 3 && name.compare(name.size() - 3, 3, ".so") == 0) files.push_back(dir + "/" + name);
  }
  closedir(d);
  std::sort(files.begin(), files.end());
  // Only regular files (or links to them) are modules: a directory, FIFO or device named *.so
  // is passed over with a warning. A module that is not a working strewn plugin is an error naming the file:
  // a plugin directory holds plugins, and a broken one must not pass unnoticed.
  for (const std::string& f : files) {
    struct stat st {};
    if (stat(f.c_str(), &st) != 0 || !S_ISREG(st.st_mode)) {
      impl_->warnings.push_back("'" + f + "' skipped: not a regular file");
      continue;
    }
    load_module(f);
  }
}

std::vector<ShapeKindInfo> ShapeRegistry::kinds() const {
  std::vector<ShapeKindInfo> out;
  for (const auto& k : impl_->kinds) out.push_back(k.second.info);
  return out;
}

const ShapeKindInfo* ShapeRegistry::find(const std::string& name) const {
  auto it = impl_->kinds.find(name);
  if (it == impl_->kinds.end())
    if (const auto renamed = impl_->former_kinds.find(name); renamed != impl_->former_kinds.end())
      it = impl_->kinds.find(renamed->second);
  return it == impl_->kinds.end() ? nullptr : &it->second.info;
}

std::optional<ShapeRegistry::Renamed> ShapeRegistry::renamed_kind(const std::string& name) const {
  if (impl_->kinds.count(name)) return std::nullopt;  // a loaded kind of that name wins
  const auto renamed = impl_->former_kinds.find(name);
  if (renamed == impl_->former_kinds.end() || !impl_->kinds.count(renamed->second)) return std::nullopt;
  return Renamed{renamed->second, former_kind_warning(name, renamed->second)};
}

std::vector<std::string> ShapeRegistry::suggestions(const std::string& name) const {
  std::vector<std::string> names;
  for (const auto& k : impl_->kinds) names.push_back(k.first);
  return closest_names(name, names);
}

const std::vector<std::string>& ShapeRegistry::warnings() const { return impl_->warnings; }

namespace {

// Multiplies every number in a number, a point, a list of points or a list of point lists.
void scale_lengths(nlohmann::json& v, double k) {
  if (v.is_number()) v = v.get<double>() * k;
  else if (v.is_array())
    for (auto& e : v) scale_lengths(e, k);
}

}  // namespace

std::string ShapeRegistry::params_in_metres(const std::string& kind, const std::string& params_json,
                                            double metres_per_unit) const {
  if (metres_per_unit == 1.0) return params_json;
  detail::check_json_nesting(params_json, "shape '" + kind + "'");
  nlohmann::json params = nlohmann::json::parse(params_json, nullptr, false);
  const ShapeKindInfo* info = find(kind);
  if (params.is_discarded() || !params.is_object() || info == nullptr) return params_json;
  const nlohmann::json d = nlohmann::json::parse(info->params_json, nullptr, false);
  if (d.is_discarded() || !d.contains("params") || !d["params"].is_array()) return params_json;
  for (const auto& p : d["params"]) {
    if (!p.is_object() || !p.contains("name") || !p["name"].is_string()) continue;
    std::string name = p["name"];
    if (!params.contains(name) && p.contains("former") && p["former"].is_object() &&
        p["former"].contains("name") && p["former"]["name"].is_string())
      name = p["former"]["name"];  // a former name, renamed by build()
    if (!params.contains(name)) continue;  // a default: in metres, as the plugin states it
    if (p.value("unit", "") == "m") {
      scale_lengths(params[name], metres_per_unit);
    } else if (p.value("type", "") == "parts" && params[name].is_array()) {
      for (auto& part : params[name])  // a composite's parts, each in the same unit
        if (part.is_object() && part.contains("kind") && part["kind"].is_string() && part.contains("params"))
          part["params"] = nlohmann::json::parse(
              params_in_metres(part["kind"].get<std::string>(), part["params"].dump(), metres_per_unit), nullptr, false);
    }
  }
  return params.dump();
}

Region ShapeRegistry::build(const std::string& kind, const std::string& params_json,
                            const BuildOptions& options) const {
  return impl_->build(kind, params_json, options, 0);
}

}  // namespace strewn
