// The `strewn._strewn` extension: thin pybind11 bindings over the public engine API
// (engine/include/strewn). Python-facing names, docstrings and argument handling live in
// python/strewn/__init__.py; this file converts values, releases the GIL around every computation
// and maps strewn::input_error to strewn.InputError (a ValueError). One exception, for speed:
// strewn.probability's common call is served here (probability_fast, below), in front of the
// Python function that serves every other call.

#include <pybind11/eigen.h>
#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <algorithm>
#include <future>
#include <limits>
#include <thread>
#include <tuple>
#include <atomic>
#include <chrono>
#include <functional>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <memory>
#include <mutex>
#include <optional>
#include <sstream>
#include <string>
#include <utility>
#include <iomanip>
#include <vector>

#include "strewn/strewn.hpp"
#include "strewn/student_t_fit.hpp"

#include "output/drop_output.hpp"
#include "output/thrower_output.hpp"

namespace py = pybind11;
using namespace strewn;

// --- instances whose __init__ never ran ----------------------------------------------------------
// `strewn.Normal.__new__(strewn.Normal)` makes an instance without a C++ value; pybind11's caster
// would then hand every method a freshly allocated, never constructed one (a Normal's repr printed
// garbage, a Region's crashed). Each class of the module is loaded through this caster instead,
// which refuses such an instance with a TypeError before anything reads it: methods, properties,
// pickling and every function taking the object as an argument. probability_fast's value_of()
// checks the same flag and hands such an instance to the general path, which ends here.

namespace pybind11::detail {

// How a usable instance of each class is made, for the message.
template <class T> struct made_by;
template <> struct made_by<Gaussian> { static constexpr const char* text = "strewn.Normal(mean, cov) or one of its class methods (from_axes, from_cep, ...)"; };
template <> struct made_by<ScatterModel> { static constexpr const char* text = "strewn.Mixture([(weight, normal), ...])"; };
template <> struct made_by<Region> { static constexpr const char* text = "strewn.Region.polygon(...), strewn.shape(...) or another of the region builders"; };
template <> struct made_by<Site> { static constexpr const char* text = "strewn.load_site(path)"; };
template <> struct made_by<IntegrateOptions> { static constexpr const char* text = "strewn._strewn._options(...)"; };

template <class T>
class initialised_caster : public type_caster_base<T> {
 public:
  bool load(handle src, bool convert) { return this->template load_impl<initialised_caster<T>>(src, convert); }
  // Called by load_impl with the instance's value and holder, for the type itself or a subclass
  // (v_h.type is null for the type itself).
  void load_value(value_and_holder&& v_h) {
    if (!v_h.holder_constructed()) {
      const char* name = (v_h.type ? v_h.type : this->typeinfo)->type->tp_name;
      if (const char* dot = std::strrchr(name, '.')) name = dot + 1;
      throw type_error(std::string("this strewn.") + name +
                       " object was not initialised (made by __new__ without __init__); make one with " +
                       made_by<T>::text);
    }
    type_caster_base<T>::load_value(std::move(v_h));
  }
};

template <> class type_caster<Gaussian> : public initialised_caster<Gaussian> {};
template <> class type_caster<ScatterModel> : public initialised_caster<ScatterModel> {};
template <> class type_caster<Region> : public initialised_caster<Region> {};
template <> class type_caster<Site> : public initialised_caster<Site> {};
template <> class type_caster<IntegrateOptions> : public initialised_caster<IntegrateOptions> {};

}  // namespace pybind11::detail

namespace {

// --- the shape registry: one per process, filled on first use -----------------------------------

std::mutex registry_mutex;
std::unique_ptr<ShapeRegistry> registry_ptr;
std::vector<std::string> extra_plugin_dirs;

ShapeRegistry& registry_locked() {
  if (!registry_ptr)
    registry_ptr = std::make_unique<ShapeRegistry>(ShapeRegistry::with_default_search_path(extra_plugin_dirs));
  return *registry_ptr;
}

// The Python category of an engine warning, by its kind (never by its text): a former name is
// a DeprecationWarning, a likely mistake a UserWarning.
py::object warning_category(WarningKind kind) {
  return py::reinterpret_borrow<py::object>(kind == WarningKind::former_name ? PyExc_DeprecationWarning
                                                                            : PyExc_UserWarning);
}

// (category, message) pairs, for the Python side to issue with a stack level that points at the
// caller's line (a DeprecationWarning raised from inside the package would be hidden by default).
py::list warnings_to_show(const std::vector<Warning>& warnings) {
  py::list out;
  for (const Warning& w : warnings) out.append(py::make_tuple(warning_category(w.kind), w.message));
  return out;
}

// A region and the warnings of its build (a parameter under its former name).
py::tuple build_shape(const std::string& kind, const std::string& params_json, double sagitta) {
  BuildOptions options;
  options.sagitta = sagitta;
  std::vector<Warning> warnings;
  options.warnings = &warnings;
  Region region;
  {
    py::gil_scoped_release release;  // a plugin's build (and a composite's boolean operations)
    std::lock_guard<std::mutex> lock(registry_mutex);
    region = registry_locked().build(kind, params_json, options);
  }
  return py::make_tuple(std::move(region), warnings_to_show(warnings));
}

// Region.polygon without holes, without the plugin's JSON round trip (about 40 us of parsing
// and printing for eight vertices): the loop built here, then the same validity check and
// normalisation the registry applies to every plugin's shape (ShapeRegistry::build), so the
// region and the refusals are the same. Rows are (x, y) in metres, finite (checked by the
// caller); a closing repeat of the first vertex is dropped, as the polygon plugin does.
// Polygons with holes go through the plugin, which also checks that each hole lies inside.
Region polygon_region(const py::array_t<double, py::array::c_style | py::array::forcecast>& xy) {
  if (xy.ndim() != 2 || xy.shape(1) != 2) throw input_error("polygon: outer must be a sequence of points (x, y) in metres");
  const double* d = xy.data();
  std::vector<Vec2> v;
  for (py::ssize_t i = 0; i < xy.shape(0); ++i) v.emplace_back(d[2 * i], d[2 * i + 1]);
  if (v.size() >= 2 && v.front() == v.back()) v.pop_back();
  if (v.size() < 3) throw input_error("shape 'polygon': outer needs at least 3 distinct points");
  Region r;
  r.loops.emplace_back();
  for (std::size_t i = 0; i < v.size(); ++i) r.loops.back().push_back(Edge::segment(v[i], v[(i + 1) % v.size()]));
  py::gil_scoped_release release;
  const Validity valid = check_validity(r);
  if (!valid.valid) throw input_error("shape 'polygon': invalid geometry: " + valid.fault);
  return normalised(std::move(r));
}

void add_plugin_dir(const std::string& dir) {
  py::gil_scoped_release release;
  std::lock_guard<std::mutex> lock(registry_mutex);
  extra_plugin_dirs.push_back(dir);
  if (registry_ptr) registry_ptr->load_directory(dir);
}

py::list shape_kinds() {
  std::vector<ShapeKindInfo> kinds;
  {
    py::gil_scoped_release release;
    std::lock_guard<std::mutex> lock(registry_mutex);
    kinds = registry_locked().kinds();
  }
  py::list out;
  for (const ShapeKindInfo& k : kinds) {
    py::dict d;
    d["name"] = k.name;
    d["summary"] = k.summary;
    d["params_json"] = k.params_json;
    d["module_path"] = k.module_path;
    out.append(d);
  }
  return out;
}

// --- options and results ---------------------------------------------------------------------------

IntegrateOptions make_options(const std::string& method, double rel_tol, double abs_tol, std::uint64_t samples,
                              std::uint64_t seed, double confidence) {
  IntegrateOptions o;
  o.method = method_from_string(method);
  o.rel_tolerance = rel_tol;
  // abs_tol = 0: no absolute tolerance, the request judged on rel_tol alone. The engine wants a
  // positive abs_tolerance (a floor under a p of exactly 0); the smallest normal double is that
  // floor without being a tolerance anyone could mean (every bound above it is judged relatively).
  o.abs_tolerance = abs_tol == 0.0 ? std::numeric_limits<double>::min() : abs_tol;
  o.samples = samples;
  o.seed = seed;
  o.confidence = confidence;
  if (const std::string why = o.invalid_reason(); !why.empty()) throw input_error(why);
  return o;
}

// sigma_major and sigma_minor from the Cholesky factor L = [[a, 0], [c, d]]: its singular values,
// s1 = (hypot(a + d, c) + hypot(a - d, c)) / 2 and s2 = a d / s1 (det L = a d), each to a few eps
// relative. The eigenvalues of the rounded covariance lose eps * s1^2 / s2^2 relative in s2
// (0 for 1e-9:1).
std::pair<double, double> sigmas_of(const Gaussian& g) {
  const Mat2& L = g.cholesky();
  const double a = L(0, 0), c = L(1, 0), d = L(1, 1);
  const double s1 = 0.5 * (std::hypot(a + d, c) + std::hypot(a - d, c));
  return {s1, a * d / s1};
}

std::string status_of(const Estimate& e) { return to_string(e.status); }

// Thrown out of a progress callback when Python has a pending signal (Ctrl-C); the caller turns
// it back into the Python exception once it holds the GIL again.
struct interrupted {};

// A progress callback that checks for Ctrl-C with the GIL held briefly (the engine calls it from
// the calling thread, now and then; parallel_for after every item, which for a small region is
// a few microseconds: so at most every 20 ms, a clock read otherwise).
ProgressFn interrupt_check() {
  auto last = std::make_shared<std::chrono::steady_clock::time_point>(std::chrono::steady_clock::now());
  return [last](double) {
    const auto now = std::chrono::steady_clock::now();
    if (now - *last < std::chrono::milliseconds(20)) return;
    *last = now;
    py::gil_scoped_acquire acquire;
    if (PyErr_CheckSignals() != 0) throw interrupted{};
  };
}

// A computation without a progress callback (the fits), run on a worker thread while the
// calling thread, the GIL released, polls for Ctrl-C every 20 ms. On Ctrl-C the call returns at
// once with KeyboardInterrupt and the worker, which owns copies of its inputs, finishes in the
// background and is dropped (the engine's fits cannot be stopped part-way).
template <class R>
R abandonable(std::function<R()> work) {
  auto task = std::make_shared<std::packaged_task<R()>>(std::move(work));
  std::future<R> result = task->get_future();
  std::thread([task] { (*task)(); }).detach();
  {
    py::gil_scoped_release release;
    while (result.wait_for(std::chrono::milliseconds(20)) != std::future_status::ready) {
      py::gil_scoped_acquire acquire;
      if (PyErr_CheckSignals() != 0) throw py::error_already_set();
    }
  }
  return result.get();  // rethrows the fit's own exception (an input_error) here
}

template <class F>
auto interruptible(F&& f) -> decltype(f(ProgressFn{})) {
  try {
    py::gil_scoped_release release;
    return f(interrupt_check());
  } catch (const interrupted&) {
    throw py::error_already_set();  // the KeyboardInterrupt set by PyErr_CheckSignals
  }
}

// --- probabilities -------------------------------------------------------------------------------------

// Two overloads, the Normal first: a Normal passed where a ScatterModel is expected goes through
// pybind11's implicit conversion, which costs more than the integration of a small polygon.
// Monte Carlo: the sample work checked against the command's ceiling (samples x components,
// kSampleWorkCeiling) unless forced, and Ctrl-C polled through the sampler's progress callback.
void check_samples(const IntegrateOptions& options, std::size_t components, const std::vector<const Region*>& regions,
                   bool force) {
  if (options.method != Method::monte_carlo) return;
  std::size_t edges = 0;
  for (const Region* r : regions)
    for (const Loop& loop : r->loops) edges += loop.size();
  check_work(monte_carlo_work(options.samples, components, regions.size(), edges), kSampleWorkCeiling, force,
             "lower samples, use method=\"exact\", or pass force=True");
}

Estimate sampled(const ScatterModel& model, const Region& region, const IntegrateOptions& options) {
  // (judged against the request by the engine, as every method is)
  return interruptible([&](const ProgressFn& progress) {
    IntegrateOptions o = options;
    o.progress = progress;
    return integrate(model, region, o);
  });
}

// Releasing and taking back the GIL costs about as much as a small polygon's whole integration
// (measured with tests/bench/edge_bench.py: the 8-vertex polygon's call took 1.9 us, of which
// the exact method 0.8 us), so an exact probability over at most kShortPolygonEdges straight
// edges (well under the "few microseconds" of issue 20, about 75 ns an edge) keeps it; arcs,
// other families, mixtures and longer polygons release it.
constexpr std::size_t kShortPolygonEdges = 32;

bool short_exact(const Gaussian& model, const Region& region, const IntegrateOptions& options) {
  if (options.method != Method::exact || !model.family().is_normal() || model.family().has_arc()) return false;
  std::size_t edges = 0;
  for (const Loop& loop : region.loops) {
    for (const Edge& e : loop)
      if (e.kind != Edge::Kind::segment) return false;
    if ((edges += loop.size()) > kShortPolygonEdges) return false;
  }
  return true;
}

Estimate probability(const Gaussian& model, const Region& region, const IntegrateOptions& options, bool force) {
  if (options.method == Method::monte_carlo) {
    check_samples(options, 1, {&region}, force);
    return sampled(ScatterModel(model), region, options);
  }
  if (short_exact(model, region, options)) return integrate(model, region, options);
  py::gil_scoped_release release;
  return integrate(model, region, options);
}

Estimate probability_mixture(const ScatterModel& model, const Region& region, const IntegrateOptions& options,
                             bool force) {
  if (options.method == Method::monte_carlo) {
    check_samples(options, model.components().size(), {&region}, force);
    return sampled(model, region, options);
  }
  py::gil_scoped_release release;
  return integrate(model, region, options);
}

// --- strewn.Result: an estimate as a small Python object ---------------------------------------
// A type of its own rather than a pybind11 class: pybind11 would find the class by a hashed type
// lookup, copy the Estimate to the heap and register the instance in its instance map, about
// 1,500 instructions of a call whose 8-vertex polygon takes the engine about 9,600 (README,
// "Benchmarks"). Here the Estimate lives inside the object; its attributes are made on access.

struct ResultObject {
  PyObject_HEAD
  Estimate e;
};

PyTypeObject* result_type = nullptr;

const Estimate& estimate_of(PyObject* self) { return reinterpret_cast<ResultObject*>(self)->e; }

PyObject* new_result(Estimate&& e) {
  PyObject* self = result_type->tp_alloc(result_type, 0);
  if (self != nullptr) new (&reinterpret_cast<ResultObject*>(self)->e) Estimate(std::move(e));
  return self;
}

void result_dealloc(PyObject* self) {
  reinterpret_cast<ResultObject*>(self)->e.~Estimate();
  PyTypeObject* type = Py_TYPE(self);
  type->tp_free(self);
  Py_DECREF(type);  // instances of a heap type hold a reference to it
}

PyObject* result_repr(PyObject* self) {
  const Estimate& e = estimate_of(self);
  std::ostringstream s;
  s.precision(17);  // p and q round-trip through float()
  s << "strewn.Result(p=" << e.p << ", q=" << e.q;
  s.precision(3);
  s << ", abs_err=" << e.abs_err << ", method='" << to_string(e.method) << "', status='" << status_of(e) << "')";
  const std::string text = s.str();
  return PyUnicode_FromStringAndSize(text.data(), static_cast<Py_ssize_t>(text.size()));
}

template <double Estimate::*field>
PyObject* get_double(PyObject* self, void*) { return PyFloat_FromDouble(estimate_of(self).*field); }
template <double (Estimate::*fn)() const>
PyObject* get_bound(PyObject* self, void*) { return PyFloat_FromDouble((estimate_of(self).*fn)()); }
PyObject* get_method(PyObject* self, void*) { return PyUnicode_FromString(to_string(estimate_of(self).method)); }
PyObject* get_status(PyObject* self, void*) { return PyUnicode_FromString(to_string(estimate_of(self).status)); }
PyObject* get_converged(PyObject* self, void*) { return PyBool_FromLong(estimate_of(self).converged); }
PyObject* get_evaluations(PyObject* self, void*) {
  return PyLong_FromUnsignedLongLong(estimate_of(self).evaluations);
}
PyObject* get_message(PyObject* self, void*) {
  const std::string& m = estimate_of(self).message;
  return PyUnicode_DecodeUTF8(m.data(), static_cast<Py_ssize_t>(m.size()), nullptr);  // as pybind11 did
}
PyObject* get_interval(PyObject* self, void*) {
  const Estimate& e = estimate_of(self);
  if (e.method != Method::monte_carlo) Py_RETURN_NONE;
  return Py_BuildValue("(dd)", e.interval_low, e.interval_high);
}

PyGetSetDef result_getset[] = {
    {"p", get_double<&Estimate::p>, nullptr,
     const_cast<char*>("The probability of the region (per event)."), nullptr},
    {"q", get_double<&Estimate::q>, nullptr,
     const_cast<char*>("1 - p, computed on its own where the method can (exact), so a p near 1 keeps its digits in q."), nullptr},
    {"abs_err", get_double<&Estimate::abs_err>, nullptr,
     const_cast<char*>("A bound on |p - exact| (and on |q - exact| where q is computed on its own)."), nullptr},
    {"p_abs_err", get_bound<&Estimate::p_abs_err>, nullptr,
     const_cast<char*>("The bound on p's error alone (None where only abs_err is known)."), nullptr},
    {"q_abs_err", get_bound<&Estimate::q_abs_err>, nullptr,
     const_cast<char*>("The bound on q's error alone (None where only abs_err is known)."), nullptr},
    {"method", get_method, nullptr,
     const_cast<char*>("The method used: 'exact', 'cubature' or 'monte_carlo'."), nullptr},
    {"status", get_status, nullptr,
     const_cast<char*>("'converged', or why not (e.g. 'budget_exhausted'): the request was not met; abs_err still holds."), nullptr},
    {"converged", get_converged, nullptr,
     const_cast<char*>("True when abs_err meets the request (rel_tol, or abs_tol for the smallest values)."), nullptr},
    {"evaluations", get_evaluations, nullptr,
     const_cast<char*>("Integrand evaluations (or samples) spent: how the result was computed, not a figure of it."), nullptr},
    {"message", get_message, nullptr,
     const_cast<char*>("Why the request was not met, or a note on the result (empty when there is none)."), nullptr},
    {"interval", get_interval, nullptr,
     const_cast<char*>("Monte Carlo only: the Clopper-Pearson interval (low, high) at the request's confidence; None otherwise."), nullptr},
    {nullptr, nullptr, nullptr, nullptr, nullptr}};

PyType_Slot result_slots[] = {{Py_tp_dealloc, reinterpret_cast<void*>(result_dealloc)},
                              {Py_tp_repr, reinterpret_cast<void*>(result_repr)},
                              {Py_tp_getset, result_getset},
                              {0, nullptr}};

// No Py_TPFLAGS_HAVE_GC (it holds no Python objects); made only by probability(): Python may not
// instantiate it (object's tp_new would give an Estimate that was never constructed).
PyType_Spec result_spec = {"strewn._strewn.Result", sizeof(ResultObject), 0,
                           Py_TPFLAGS_DEFAULT | Py_TPFLAGS_DISALLOW_INSTANTIATION, result_slots};

py::object result_object(Estimate&& e) {
  PyObject* r = new_result(std::move(e));
  if (r == nullptr) throw py::error_already_set();
  return py::reinterpret_steal<py::object>(r);
}

// --- strewn.probability: a vectorcall entry for the common call ---------------------------------
// `strewn.probability(model, region, ...)` with a Normal or Mixture and a Region (their exact
// types) is served here without the Python wrapper and pybind11's dispatcher: the C++ objects
// are taken from the instances directly (the type compared with the cached type object, where
// pybind11 would look each class up by a hashed type id), the default options are built once
// and other options once per thread while they stay the same. Every other call (other types,
// subclasses, an uninitialised instance, a keyword or value the Python function would convert,
// reject or not know) goes to the general path, the Python function
// `strewn._probability_general`, unchanged; both end in the same probability() and
// probability_mixture() above, so the two paths give the same bits and raise the same errors
// (python/tests/test_probability_entry.py). Measured with callgrind (README, "Benchmarks").

// The request as the Python function takes it (method, rel_tol, abs_tol, samples, seed,
// confidence), before make_options() turns it into IntegrateOptions.
struct Request {
  std::string method;
  double rel_tol = 0.0, abs_tol = 0.0, confidence = 0.0;
  std::uint64_t samples = 0, seed = 0;
  bool operator==(const Request& o) const {  // the doubles bit for bit (-0.0 is not 0.0 here)
    return method == o.method && same_bits(rel_tol, o.rel_tol) && same_bits(abs_tol, o.abs_tol) &&
           same_bits(confidence, o.confidence) && samples == o.samples && seed == o.seed;
  }
  static bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }
};

struct ProbabilityEntry {
  PyTypeObject* normal = nullptr;
  PyTypeObject* mixture = nullptr;
  PyTypeObject* region = nullptr;
  Request default_request;       // the Python function's defaults (_D_* in __init__.py)
  IntegrateOptions defaults;     // make_options(default_request)
  PyObject* general = nullptr;   // strewn._probability_general (a strong reference, kept)
};
ProbabilityEntry entry;

// The C++ value of a pybind11 instance of exactly `type`, or nullptr (another type, a subclass,
// or an instance whose __init__ has not run) for the general path to handle.
template <class T>
const T* value_of(PyObject* obj, PyTypeObject* type) {
  if (Py_TYPE(obj) != type) return nullptr;
  auto* inst = reinterpret_cast<py::detail::instance*>(obj);
  if (!inst->simple_layout || !inst->simple_holder_constructed) return nullptr;
  return static_cast<const T*>(inst->simple_value_holder[0]);
}

// A number as the Python function's float(v) gives it, for a plain float or int only (not a
// bool, whose type is not exactly int; numpy scalars and the rest go to the general path).
bool plain_number(PyObject* v, double& out) {
  if (PyFloat_CheckExact(v)) {
    out = PyFloat_AS_DOUBLE(v);
    return true;
  }
  if (!PyLong_CheckExact(v)) return false;
  out = PyLong_AsDouble(v);
  if (out == -1.0 && PyErr_Occurred()) {  // too large for a double: the general path raises it
    PyErr_Clear();
    return false;
  }
  return true;
}

// A whole number from 0 to 2^64 - 1 given as a plain int, as _whole() accepts it.
bool plain_whole(PyObject* v, std::uint64_t& out) {
  if (!PyLong_CheckExact(v)) return false;
  const unsigned long long u = PyLong_AsUnsignedLongLong(v);
  if (u == static_cast<unsigned long long>(-1) && PyErr_Occurred()) {
    PyErr_Clear();
    return false;
  }
  out = u;
  return true;
}

// The request and force of a call's third and later arguments: positional method and rel_tol,
// then the keywords by name. False when anything is not plainly what _options() accepts
// unchanged, so that the general path converts it or raises its own message.
bool parse_request(PyObject* const* args, Py_ssize_t nargs, PyObject* kwnames, Request& r, bool& force) {
  if (nargs > 4) return false;
  bool seen[7] = {nargs > 2, nargs > 3, false, false, false, false, false};
  const Py_ssize_t nkw = kwnames ? PyTuple_GET_SIZE(kwnames) : 0;
  static const char* const names[7] = {"method", "rel_tol", "abs_tol", "samples", "seed", "confidence", "force"};
  for (Py_ssize_t i = -2; i < nkw; ++i) {
    int k;
    PyObject* v;
    if (i < 0) {  // the positional method (i = -2) and rel_tol (i = -1)
      k = static_cast<int>(i + 2);
      if (2 + k >= nargs) continue;
      v = args[2 + k];
    } else {
      PyObject* name = PyTuple_GET_ITEM(kwnames, i);
      for (k = 0; k < 7; ++k)
        if (PyUnicode_CompareWithASCIIString(name, names[k]) == 0) break;
      if (k == 7 || seen[k]) return false;  // unknown or repeated: Python's TypeError
      seen[k] = true;
      v = args[nargs + i];
    }
    switch (k) {
      case 0: {
        if (!PyUnicode_CheckExact(v)) return false;
        Py_ssize_t size = 0;
        const char* text = PyUnicode_AsUTF8AndSize(v, &size);
        if (text == nullptr) {
          PyErr_Clear();
          return false;
        }
        r.method.assign(text, static_cast<std::size_t>(size));
        break;
      }
      case 1: if (!plain_number(v, r.rel_tol)) return false; break;
      case 2: if (!plain_number(v, r.abs_tol) || !(r.abs_tol >= 0.0 && r.abs_tol < 1.0)) return false; break;
      case 3: if (!plain_whole(v, r.samples)) return false; break;
      case 4: if (!plain_whole(v, r.seed)) return false; break;
      case 5: if (!plain_number(v, r.confidence)) return false; break;
      default:
        if (v != Py_True && v != Py_False) return false;
        force = v == Py_True;
    }
  }
  return true;
}

// This thread's last request and its options: make_options() costs a few hundred
// instructions, and a script repeats one request. A copy is taken for each call (a Ctrl-C
// handler may call probability() with another request while a Monte Carlo run reads its own).
bool cached_options(const Request& r, IntegrateOptions& out) {
  thread_local std::optional<std::pair<Request, IntegrateOptions>> last;
  if (!last || !(last->first == r)) {
    try {
      last.emplace(r, make_options(r.method, r.rel_tol, r.abs_tol, r.samples, r.seed, r.confidence));
    } catch (const input_error&) {
      return false;  // refused: the general path raises it in its own words
    }
  }
  out = last->second;
  return true;
}

PyObject* probability_fast(PyObject*, PyObject* const* args, size_t nargsf, PyObject* kwnames) {
  const Py_ssize_t nargs = PyVectorcall_NARGS(nargsf);
  if (nargs >= 2) {
    const Region* region = value_of<Region>(args[1], entry.region);
    const Gaussian* normal = region ? value_of<Gaussian>(args[0], entry.normal) : nullptr;
    const ScatterModel* mixture = region && !normal ? value_of<ScatterModel>(args[0], entry.mixture) : nullptr;
    if (normal || mixture) {
      const bool plain = nargs == 2 && (kwnames == nullptr || PyTuple_GET_SIZE(kwnames) == 0);
      IntegrateOptions options;
      bool force = false;
      if (!plain) {
        Request r = entry.default_request;
        if (!parse_request(args, nargs, kwnames, r, force) || !cached_options(r, options))
          return PyObject_Vectorcall(entry.general, args, nargsf, kwnames);
      }
      const IntegrateOptions& o = plain ? entry.defaults : options;
      // The exceptions as pybind11's dispatcher turns them into Python's (InputError and the
      // rest, by the registered translators).
      try {
        return new_result(normal ? probability(*normal, *region, o, force)
                                 : probability_mixture(*mixture, *region, o, force));
      } catch (py::error_already_set& e) {
        e.restore();
        return nullptr;
      } catch (...) {
        if (py::detail::apply_exception_translators(py::detail::get_local_internals().registered_exception_translators))
          return nullptr;
        if (py::detail::apply_exception_translators(py::detail::get_internals().registered_exception_translators))
          return nullptr;
        PyErr_SetString(PyExc_SystemError, "Exception escaped from default exception translator!");
        return nullptr;
      }
    }
  }
  return PyObject_Vectorcall(entry.general, args, nargsf, kwnames);
}

// strewn.probability itself, made once by the package (python/strewn/__init__.py) from its
// general function, its default request and the docstring (whose first lines are the
// signature, for inspect.signature and help()).
py::object make_probability(py::object general, const std::string& method, double rel_tol, double abs_tol,
                            std::uint64_t samples, std::uint64_t seed, double confidence, const std::string& doc) {
  entry.normal = reinterpret_cast<PyTypeObject*>(py::type::of<Gaussian>().ptr());
  entry.mixture = reinterpret_cast<PyTypeObject*>(py::type::of<ScatterModel>().ptr());
  entry.region = reinterpret_cast<PyTypeObject*>(py::type::of<Region>().ptr());
  entry.default_request = Request{method, rel_tol, abs_tol, confidence, samples, seed};
  entry.defaults = make_options(method, rel_tol, abs_tol, samples, seed, confidence);
  entry.general = general.release().ptr();
  // Kept for the life of the process (a function object points at its method table); a reload
  // of the package makes new ones.
  auto* def = new PyMethodDef{"probability", reinterpret_cast<PyCFunction>(reinterpret_cast<void (*)()>(probability_fast)),
                              METH_FASTCALL | METH_KEYWORDS, (new std::string(doc))->c_str()};
  PyObject* f = PyCFunction_NewEx(def, nullptr, py::str("strewn").ptr());
  if (f == nullptr) throw py::error_already_set();
  return py::reinterpret_steal<py::object>(f);
}

py::tuple probability_many(const ScatterModel& model, const std::vector<const Region*>& regions,
                           const IntegrateOptions& options, int threads, bool force) {
  const std::size_t n = regions.size();
  check_samples(options, model.components().size(), regions, force);
  py::array_t<double> p(n), q(n), err(n);
  py::array_t<bool> converged(n);
  std::vector<Estimate> results(n);
  interruptible([&](const ProgressFn& progress) {
    parallel_for(n, threads, [&](std::size_t i) { results[i] = integrate(model, *regions[i], options); },
                 progress);
  });
  auto pp = p.mutable_unchecked<1>();
  auto qq = q.mutable_unchecked<1>();
  auto ee = err.mutable_unchecked<1>();
  auto cc = converged.mutable_unchecked<1>();
  for (std::size_t i = 0; i < n; ++i) {
    pp(i) = results[i].p;
    qq(i) = results[i].q;
    ee(i) = results[i].abs_err;
    cc(i) = results[i].converged;
  }
  return py::make_tuple(p, q, err, converged);
}

// One footprint at many points, through the engine's risk-map kernel (compute_risk_map): each
// row of the (rows x columns) point arrays is cut into chunks, and each chunk into runs of
// points evenly spaced along x at one y, exactly as GridSpec::centre places a row of cells;
// every run is one map row (the footprint set up once for the run), a lone point a map of one
// cell. A point's value therefore depends on the point alone, never on its neighbours: the
// same point gives the same bits in any call.
constexpr std::size_t kChunk = 128;

py::tuple probability_at(const ScatterModel& model, const Region& footprint,
                         const py::array_t<double, py::array::c_style | py::array::forcecast>& xs,
                         const py::array_t<double, py::array::c_style | py::array::forcecast>& ys,
                         const IntegrateOptions& options, int threads, bool force) {
  if (xs.ndim() != 2 || ys.ndim() != 2 || xs.shape(0) != ys.shape(0) || xs.shape(1) != ys.shape(1))
    throw input_error("probability_at: xs and ys must have the same shape");
  const std::size_t rows = static_cast<std::size_t>(xs.shape(0)), cols = static_cast<std::size_t>(xs.shape(1));
  const double* x = xs.data();
  const double* y = ys.data();
  for (std::size_t k = 0; k < rows * cols; ++k)
    if (!std::isfinite(x[k]) || !std::isfinite(y[k])) {
      std::ostringstream m;
      m.precision(17);
      m << "probability_at: point " << k << " (" << x[k] << ", " << y[k] << ") m is not finite";
      throw input_error(m.str());
    }
  const std::vector<MapSource> sources{MapSource{model, 1.0, 1.0}};
  GridSpec all;
  all.columns = static_cast<int>(std::min<std::size_t>(rows * cols, 2147483647));
  all.rows = 1;
  check_work(risk_map_work(sources, footprint, all), kMapWorkCeiling, force,
             "pass fewer points, or force=True");
  py::array_t<double> p({rows, cols}), err({rows, cols});
  py::array_t<bool> converged({rows, cols});
  double* pp = p.mutable_data();
  double* ee = err.mutable_data();
  bool* cc = converged.mutable_data();
  RiskMapOptions map_options;
  map_options.integrate = options;
  map_options.threads = 1;  // the chunks are shared among threads here
  const std::size_t chunks_per_row = (cols + kChunk - 1) / kChunk;
  interruptible([&](const ProgressFn& progress) {
    parallel_for(rows * chunks_per_row, threads, [&](std::size_t item) {
      const std::size_t j = item / chunks_per_row;
      const std::size_t begin = j * cols + (item % chunks_per_row) * kChunk;
      const std::size_t end = std::min(begin + kChunk, (j + 1) * cols);
      std::size_t i = begin;
      while (i < end) {
        GridSpec run;
        run.origin = Vec2(x[i], y[i]);
        run.spacing = 1.0;
        run.rows = 1;
        std::size_t n = 1;
        if (i + 1 < end) {
          const double dx = x[i + 1] - x[i];
          if (dx > 0.0 && std::isfinite(dx)) {
            run.spacing = dx;
            while (i + n < end) {
              const Vec2 c = run.centre(static_cast<int>(n), 0);
              if (c.x() != x[i + n] || c.y() != y[i + n] || y[i + n] != y[i]) break;
              ++n;
            }
            if (n == 1) run.spacing = 1.0;
          }
        }
        run.columns = static_cast<int>(n);
        const RiskMap m = compute_risk_map(sources, footprint, run, Period::event, map_options);
        for (std::size_t k = 0; k < n; ++k) {
          pp[i + k] = m.value[k];
          ee[i + k] = m.abs_err[k];
          cc[i + k] = true;
        }
        if (!m.converged) {
          // The map says only that some cell missed; ask each cell of this run on its own (the
          // values stay those of the run, which are the same bits).
          for (std::size_t k = 0; k < n; ++k) {
            GridSpec one;
            one.origin = run.centre(static_cast<int>(k), 0);
            one.columns = one.rows = 1;
            cc[i + k] = compute_risk_map(sources, footprint, one, Period::event, map_options).converged;
          }
        }
        i += n;
      }
    }, progress);
  });
  return py::make_tuple(p, err, converged);
}

// --- fitting -------------------------------------------------------------------------------------------

py::list pair(const Vec2& v) { return py::cast(std::vector<double>{v.x(), v.y()}); }
py::list interval(const Interval& i) { return py::cast(std::vector<double>{i.low, i.high}); }
py::list matrix(const Mat2& m) {
  return py::cast(std::vector<std::vector<double>>{{m(0, 0), m(0, 1)}, {m(1, 0), m(1, 1)}});
}

std::vector<Vec2> points_of(const py::array_t<double, py::array::c_style | py::array::forcecast>& xy) {
  if (xy.ndim() != 2 || xy.shape(1) != 2) throw input_error("fit_impacts: xy must be an array of shape (n, 2)");
  std::vector<Vec2> points(static_cast<std::size_t>(xy.shape(0)));
  const double* d = xy.data();
  for (std::size_t i = 0; i < points.size(); ++i) {
    points[i] = Vec2(d[2 * i], d[2 * i + 1]);
    if (!points[i].allFinite()) {
      std::ostringstream m;
      m.precision(17);
      m << "fit_impacts: row " << i << " (" << d[2 * i] << ", " << d[2 * i + 1] << ") is not finite";
      throw input_error(m.str());
    }
  }
  return points;
}

// The scale figures that the normal's and the t's fits share, under the JSON's names: the axes
// with their intervals, the circular-equivalent sigma, CEP and R95.
template <class Fit>
void put_scale_figures(py::dict& d, const Fit& f) {
  d["sigma_major"] = f.axes.sigma_major;
  d["sigma_major_ci"] = interval(f.sigma_major_ci);
  d["sigma_minor"] = f.axes.sigma_minor;
  d["sigma_minor_ci"] = interval(f.sigma_minor_ci);
  d["angle_deg"] = f.axes.angle_deg;
  d["sigma"] = f.sigma;
  d["sigma_ci"] = interval(f.sigma_ci);
  d["cep"] = f.cep;
  d["cep_ci"] = interval(f.cep_ci);
  d["r95"] = f.r95;
  d["r95_ci"] = interval(f.r95_ci);
}

// The keys of one group of `strewn fit --format json` (cli/output/fit_output.cpp), plus the models.
py::dict fit_impacts(const py::array_t<double, py::array::c_style | py::array::forcecast>& xy, const Vec2& aim,
                     double confidence, int bootstrap_replicates, std::uint64_t seed) {
  const std::vector<Vec2> points = points_of(xy);
  FitOptions o;
  o.confidence = confidence;
  o.bootstrap_replicates = bootstrap_replicates;
  o.seed = seed;
  NormalFit f;
  MixtureFit mix;
  std::tie(f, mix) = abandonable<std::pair<NormalFit, MixtureFit>>([points, aim, o] {
    NormalFit fit = fit_normal(points, aim, o);
    MixtureFit two = fit_two_component(points, fit);
    return std::pair<NormalFit, MixtureFit>{std::move(fit), std::move(two)};
  });
  py::dict d;
  d["n"] = f.n;
  d["confidence"] = f.confidence;
  d["aim"] = pair(f.aim);
  d["mean"] = pair(f.mean);
  d["bias"] = pair(f.mean - f.aim);
  d["hotelling_t2"] = f.t2;
  d["no_bias_p_value"] = f.no_bias_p_value;
  d["covariance"] = matrix(f.covariance);
  put_scale_figures(d, f);
  d["sigma_dof"] = f.sigma_dof;
  d["sigma_upper_one_sided"] = f.sigma_upper;
  py::dict region;
  region["semi_axes"] = py::cast(std::vector<double>{f.mean_region_axes.sigma_major, f.mean_region_axes.sigma_minor});
  region["angle_deg"] = f.mean_region_axes.angle_deg;
  region["confidence"] = f.confidence;
  d["mean_region"] = region;
  d["ks_statistic"] = f.ks_statistic;
  d["ks_p_value"] = f.ks_p_value;
  d["anderson_darling_major"] = f.ad_major;
  d["anderson_darling_minor"] = f.ad_minor;
  d["axes_p_value"] = f.axes_p_value;
  d["normal_rejected"] = f.normal_rejected();
  d["design_factor"] = f.design_factor;
  d["mahalanobis2"] = py::cast(f.mahalanobis2);
  d["outliers"] = py::cast(f.outliers);
  py::list rows;
  for (std::size_t i : f.outliers) rows.append(i + 1);
  d["outlier_rows"] = rows;
  d["outlier_d2_cutoff"] = std::isfinite(f.outlier_d2) ? py::object(py::float_(f.outlier_d2)) : py::none();
  py::dict m;
  m["preferred"] = mix.preferred;
  m["wide_weight"] = mix.wide_weight;
  m["bic"] = mix.bic;
  m["single_bic"] = mix.single_bic;
  m["core_mean"] = pair(mix.core_mean);
  m["wide_mean"] = pair(mix.wide_mean);
  m["core_covariance"] = matrix(mix.core_covariance);
  m["wide_covariance"] = matrix(mix.wide_covariance);
  m["log_likelihood"] = mix.log_likelihood;
  m["single_log_likelihood"] = mix.single_log_likelihood;
  m["iterations"] = mix.iterations;
  d["mixture"] = m;
  d["model"] = py::cast(f.gaussian());
  d["design_model"] = py::cast(f.design());
  // MixtureFit::model() is not exported from libstrewn (the struct carries no STREWN_API): the
  // same two components, as that function builds them (engine/src/mixture_fit.cpp).
  d["mixture_model"] =
      mix.wide_weight > 0.0 && mix.wide_weight < 1.0
          ? py::cast(ScatterModel::mixture({{1.0 - mix.wide_weight, Gaussian::from_covariance(mix.core_mean, mix.core_covariance)},
                                            {mix.wide_weight, Gaussian::from_covariance(mix.wide_mean, mix.wide_covariance)}}))
          : py::none();
  return d;
}

// The keys of a group's "student_t" object in `strewn fit --format json`
// (cli/output/fit_output.cpp), plus n, confidence and the fitted model.
py::dict fit_student_t_dict(const py::array_t<double, py::array::c_style | py::array::forcecast>& xy, double confidence,
                            int bootstrap_replicates, std::uint64_t seed, double nu_min, double nu_max) {
  const std::vector<Vec2> points = points_of(xy);
  StudentTFitOptions o;
  o.confidence = confidence;
  o.bootstrap_replicates = bootstrap_replicates >= 0 ? bootstrap_replicates : student_t_default_replicates(points.size());
  o.seed = seed;
  o.nu_min = nu_min;
  o.nu_max = nu_max;
  const StudentTFit t = abandonable<StudentTFit>([points, o] { return fit_student_t(points, o); });
  py::dict d;
  d["n"] = t.n;
  d["confidence"] = t.confidence;
  d["nu"] = t.nu;
  // As the CLI writes it: an interval reaching the range's cap is "nu >= low", its upper end None.
  d["nu_ci"] = t.nu_ci_open_above ? py::cast(std::vector<py::object>{py::float_(t.nu_ci.low), py::none()}) : interval(t.nu_ci);
  d["nu_ci_open_above"] = t.nu_ci_open_above;
  d["nu_at"] = t.nu_at == NuAt::interior ? "interior" : t.nu_at == NuAt::lower_end ? "lower_end" : "upper_end";
  d["nu_range"] = py::cast(std::vector<double>{t.nu_min, t.nu_max});
  d["location"] = pair(t.mean);
  d["scale"] = matrix(t.scale);
  put_scale_figures(d, t);
  d["log_likelihood"] = t.log_likelihood;
  d["aic"] = t.aic;
  d["bic"] = t.bic;
  d["bootstrap_replicates"] = t.draws.size();
  d["interval_method"] = kStudentTIntervalMethod;
  if (!t.draws.empty()) {
    py::dict c;
    const char* names[] = {"sigma", "sigma_major", "sigma_minor", "cep", "r95"};
    for (int k = 0; k < 5; ++k) c[names[k]] = t.figure_lr_cutoff[k];
    d["profile_lr_cutoffs"] = c;
  }
  d["model"] = py::cast(t.spread());
  return d;
}

py::dict fit_counts_dict(std::uint64_t k, std::uint64_t n, double radius, double confidence) {
  const CountFit c = abandonable<CountFit>([=] { return fit_counts(k, n, radius, confidence); });
  // None inside: sigma is bounded from below only, and an infinite sigma passed on by a script
  // would make every zone's p 0; refused as `strewn fit --counts` refuses it.
  if (c.k == 0) {
    std::ostringstream m;
    m << "fit_counts: 0 of " << c.n << " impacts within " << c.radius
      << " m: the data only bound sigma from below (sigma >= " << std::setprecision(4) << c.sigma_lower
      << " m, one-sided " << 100 * c.confidence
      << "%) and give no spread that could be written; count within a larger radius";
    throw input_error(m.str());
  }
  py::dict d;
  d["k"] = c.k;
  d["n"] = c.n;
  d["radius"] = c.radius;
  d["confidence"] = c.confidence;
  d["fraction"] = c.fraction;
  d["fraction_ci"] = interval(c.fraction_ci);
  d["sigma_ci"] = interval(c.sigma_ci);
  d["sigma_upper_one_sided"] = c.sigma_upper;
  d["sigma_lower_one_sided"] = c.sigma_lower;
  if (c.k == c.n) {  // as the CLI writes it: no point estimate, the bound is what is written
    d["sigma"] = py::none();
    d["written_sigma"] = c.sigma_upper;
    d["written_as"] = "one-sided upper bound";
  } else {
    d["sigma"] = c.sigma;
  }
  return d;
}

py::dict fit_censored_dict(const std::vector<double>& radii, std::uint64_t outside, double radius,
                           double confidence) {
  const CensoredFit c = abandonable<CensoredFit>([=] { return fit_censored(radii, outside, radius, confidence); });
  py::dict d;
  d["measured"] = c.measured;
  d["outside"] = c.outside;
  d["radius"] = c.radius;
  d["confidence"] = c.confidence;
  d["sigma"] = c.sigma;
  d["sigma_ci"] = interval(c.sigma_ci);
  d["sigma_ci_method"] = CensoredFit::method;
  d["likelihood_ratio_ci"] = interval(c.lr_ci);
  d["sigma_upper_one_sided"] = c.sigma_upper;
  return d;
}


// --- sites (strewn/site_io.hpp, assess.hpp, design.hpp, deposition.hpp, site_map.hpp) --------------
// Each returns the fields of the command's JSON (cli/output/*_output.cpp) as Python values; the
// engine computes, these functions only convert.

Period period_from(const std::string& per) {
  if (per == "event") return Period::event;
  if (per == "session") return Period::session;
  if (per == "year") return Period::year;
  throw input_error("per must be \"event\", \"session\" or \"year\" (got \"" + per + "\")");
}

py::tuple vec(const Vec2& v) { return py::make_tuple(v.x(), v.y()); }

std::shared_ptr<Site> load_site_py(const std::string& path) {
  py::gil_scoped_release release;
  std::lock_guard<std::mutex> lock(registry_mutex);
  return std::make_shared<Site>(load_site(path, registry_locked()));
}

py::dict site_header(const Site& s) {
  py::dict d;
  d["site"] = s.site_name;
  d["file"] = s.file;
  return d;
}

// The zone records of `strewn assess --format json` (cli/output/assess_output.cpp, write_json),
// and as JSON text its other parts: `throwers`, `barriers` and `sources_from_physics` (the
// CLI's own builders, so the keys are the same).
py::tuple site_assess(const Site& site, const std::string& method, double rel_tol, bool verify) {
  Site s = site;
  if (!method.empty()) s.options.method = method_from_string(method);
  if (rel_tol > 0) s.options.rel_tolerance = rel_tol;
  if (const std::string why = s.options.invalid_reason(); !why.empty()) throw input_error(why);
  const Assessment a = interruptible([&](const ProgressFn& progress) { return assess(s, verify, progress); });
  py::list out;
  for (const ZoneResult& z : a.zones) {
    py::dict zj;
    zj["name"] = z.zone->name;
    zj["role"] = to_string(z.zone->role);
    zj["shape"] = z.zone->shape;
    if (!z.zone->geometry_file.empty()) zj["geometry_file"] = z.zone->geometry_file;
    py::list sources;
    for (const SourceResult& r : z.sources) {
      py::dict sj;
      sj["source"] = r.source;
      sj["p_event"] = r.event.p;
      sj["p_outside_event"] = r.event.q;
      sj["abs_err"] = r.event.abs_err;
      sj["p_outside_abs_err"] = r.event.q_abs_err();
      sj["q_event"] = r.event.q;  // former names, kept for one release
      sj["q_abs_err"] = r.event.q_abs_err();
      sj["converged"] = r.event.converged;
      sj["evaluations"] = r.event.evaluations;
      sj["p_session"] = r.per_session;
      sj["p_session_abs_err"] = r.per_session_err;
      sj["p_year"] = r.per_year;
      sj["p_year_abs_err"] = r.per_year_err;
      sj["expected_hits_per_year"] = r.expected_hits_per_year;
      if (!r.event.message.empty()) sj["message"] = r.event.message;
      if (r.verification) {
        py::dict v;
        v["method"] = to_string(r.verification->secondary.method);
        v["p_event"] = r.verification->secondary.p;
        v["abs_err"] = r.verification->secondary.abs_err;
        v["agree"] = r.verification->agree;
        sj["verification"] = v;
      }
      sources.append(sj);
    }
    zj["sources"] = sources;
    py::dict all;
    all["p_session"] = z.total_per_session;
    all["p_session_abs_err"] = z.total_per_session_err;
    all["p_year"] = z.total_per_year;
    all["p_year_abs_err"] = z.total_per_year_err;
    all["expected_hits_per_year"] = z.total_expected_hits_per_year;
    all["abs_err_per_event"] = z.total_abs_err_per_event;
    zj["all_sources"] = all;
    if (z.individual_risk_per_year) {
      py::dict o;
      o["fraction"] = *z.zone->occupancy;
      o["individual_risk_per_year"] = *z.individual_risk_per_year;
      zj["occupancy"] = o;
    }
    if (z.zone->limit) {
      py::dict l;
      l["value"] = *z.zone->limit;
      l["per"] = to_string(z.zone->limit_per);
      l["compared"] = z.limited_value;
      l["compared_upper_bound"] = z.limited_upper;
      l["holds"] = *z.limit_holds;
      l["undecided"] = z.limit_undecided;
      zj["limit"] = l;
    }
    zj["status"] = to_string(z.status);
    out.append(zj);
  }
  nlohmann::json parts = nlohmann::json::object();
  parts["throwers"] = cli::throwers_json(s);
  parts["barriers"] = cli::barriers_json(s, a);
  parts["sources_from_physics"] = nlohmann::json::array();
  for (const Source& src : s.sources)
    if (src.drop) parts["sources_from_physics"].push_back(cli::drop_json(src, cli::Lengths(s)));
  return py::make_tuple(out, parts.dump());
}

// x, y, risk, bound (rows x columns), and the map's summary.
py::tuple site_risk_map(const Site& s, const std::string& footprint, const std::string& footprint_params,
                        const std::string& per, int cells, const std::vector<double>& extent, int threads, bool force) {
  SiteMapRequest r;
  r.footprint_kind = footprint;
  r.footprint_params = footprint_params;
  r.per = period_from(per);
  r.cells = cells;
  r.extent = extent;
  r.threads = threads;
  r.force = force;
  const SiteMap m = interruptible([&](const ProgressFn& progress) {
    std::lock_guard<std::mutex> lock(registry_mutex);
    return make_site_map(s, registry_locked(), r, progress);
  });
  const GridSpec& g = m.map.grid;
  const auto rows = static_cast<py::ssize_t>(g.rows), cols = static_cast<py::ssize_t>(g.columns);
  py::array_t<double> x({rows, cols}), y({rows, cols}), risk({rows, cols}), bound({rows, cols});
  auto xx = x.mutable_unchecked<2>();
  auto yy = y.mutable_unchecked<2>();
  auto rr = risk.mutable_unchecked<2>();
  auto bb = bound.mutable_unchecked<2>();
  for (py::ssize_t j = 0; j < rows; ++j)
    for (py::ssize_t i = 0; i < cols; ++i) {
      const Vec2 c = g.centre(static_cast<int>(i), static_cast<int>(j));
      const auto k = static_cast<std::size_t>(j * cols + i);
      xx(j, i) = c.x();
      yy(j, i) = c.y();
      rr(j, i) = m.map.value[k];
      bb(j, i) = m.map.abs_err[k];
    }
  py::list contours;
  for (const LabelledContours& c : m.contours) {
    py::list lines;
    for (const ContourLine& line : c.set.lines) {
      py::array_t<double> pts({static_cast<py::ssize_t>(line.points.size()), py::ssize_t{2}});
      auto pp = pts.mutable_unchecked<2>();
      for (std::size_t k = 0; k < line.points.size(); ++k) {
        pp(static_cast<py::ssize_t>(k), 0) = line.points[k].x();
        pp(static_cast<py::ssize_t>(k), 1) = line.points[k].y();
      }
      lines.append(py::make_tuple(pts, line.closed));
    }
    py::dict cd;
    cd["level"] = c.set.level;
    cd["label"] = c.label;
    cd["log10_accuracy"] = c.set.log10_error;
    cd["lines"] = lines;
    contours.append(cd);
  }
  py::dict info;
  info["footprint"] = m.footprint;
  info["per"] = to_string(m.per);
  info["origin"] = vec(g.origin);
  info["spacing_m"] = g.spacing;
  info["columns"] = g.columns;
  info["rows"] = g.rows;
  info["converged"] = m.map.converged;
  info["status"] = to_string(m.status);
  // The command's warning for an extent beside the site (cli/commands/map.cpp), in the words it
  // prints, in metres (the module's unit) and with the keyword's name: a likely mistake.
  // The footprint build's own warnings first (a parameter under its former name), as the
  // command prints them.
  std::vector<Warning> warnings = m.warnings;
  if (m.extent_holds_nothing && extent.size() == 4) {
    const BoundingBox site = site_extent(s);
    warnings.push_back({WarningKind::likely_mistake,
                        "extent: from " + position_text(Vec2(extent[0], extent[1])) + " to " +
                            position_text(Vec2(extent[2], extent[3])) +
                            " m holds no zone and no source's mean impact point (the site lies from " +
                            position_text(site.min) + " to " + position_text(site.max) + "): every cell is empty ground"});
  }
  if (m.cells_too_coarse()) warnings.push_back({WarningKind::likely_mistake, coarse_cells_warning(m) + " (extent=, cells=)"});
  return py::make_tuple(x, y, risk, bound, contours, info, warnings_to_show(warnings));
}

// The fields of `strewn solve clearance --format json` (cli/output/design_output.cpp).
py::dict site_clearance(const Site& s, const std::string& zone, const std::optional<Vec2>& person,
                        const std::string& source, double limit, const std::string& per,
                        const std::optional<Vec2>& direction, double max_move, int steps, double tolerance) {
  ClearanceQuery q;
  q.zone = zone;
  q.person = person;
  q.source = source;
  q.person_limit = limit;
  q.person_per = period_from(per);
  q.direction = direction;
  q.max_move = max_move;
  q.steps = steps;
  q.tolerance = tolerance;
  // Ctrl-C polled from the search's progress callback (interruptible), as in probability_many.
  // The callback takes the GIL while this thread holds registry_mutex: safe, as every other
  // holder of the mutex releases the GIL before it locks.
  const ClearanceAnswer a = interruptible([&](const ProgressFn& progress) {
    std::lock_guard<std::mutex> lock(registry_mutex);
    return solve_clearance(s, registry_locked(), q, progress);
  });
  const Crossing& c = a.crossing;
  py::dict j = site_header(s);
  j["problem"] = "clearance";
  j["subject"] = a.subject;
  j["direction"] = vec(a.direction);
  j["direction_reason"] = a.direction_reason;
  j["zones_checked"] = a.limited_zones;
  j["max_move_m"] = q.max_move;
  j["window_m"] = q.max_move;  // former name of max_move_m, kept for one release
  j["found"] = c.found;
  j["start"] = vec(a.start);
  if (q.person) {
    py::dict limit_used;
    limit_used["value"] = q.person_limit;
    limit_used["per"] = to_string(q.person_per);
    j["person_limit"] = limit_used;
  }
  if (c.found) {
    j["moved_to"] = vec(a.moved_to);
    j["shift_m"] = c.x;
    j["shift_fails_m"] = c.x_fails;
    j["bracket_width_m"] = std::fabs(c.x - c.x_fails);
    j["risk_over_limit_at_shift"] = a.risk_at_answer;
    j["risk_over_limit_just_short"] = a.risk_at_fail;
  } else {
    j["why"] = c.why;
    if (!a.failing_limit.empty()) {
      j["failing_limit"] = a.failing_limit;
      j["failing_ratio"] = a.failing_ratio;
    }
  }
  j["evaluations"] = c.evaluations;
  j["status"] = to_string(a.status);
  return j;
}

// The fields of `strewn solve spread --format json`.
py::dict site_spread(const Site& s, const std::string& source, double min_factor, double max_factor, int steps,
                     double tolerance) {
  SpreadQuery q;
  q.source = source;
  q.min_factor = min_factor;
  q.max_factor = max_factor;
  q.steps = steps;
  q.tolerance = tolerance;
  const SpreadAnswer a = interruptible([&](const ProgressFn& progress) { return solve_spread(s, q, progress); });
  const Crossing& c = a.crossing;
  py::dict j = site_header(s);
  j["problem"] = "spread";
  j["sources"] = q.source.empty() ? std::string("all") : q.source;
  j["found"] = c.found;
  if (c.found) {
    j["factor"] = a.factor;
    j["factor_fails"] = a.factor_fails;
    j["holds_over_whole_window"] = c.holds_to_end;
    j["limiting_zone"] = a.worst_zone;
    py::list spreads;
    for (const ScaledSpread& sp : a.spreads) {
      py::dict sj;
      sj["source"] = sp.source;
      sj["cep_m"] = sp.cep;
      py::list comps;
      for (const SpreadAxes& ax : sp.components) {
        py::dict cj;
        cj["sigma_major_m"] = ax.sigma_major;
        cj["sigma_minor_m"] = ax.sigma_minor;
        cj["angle_deg"] = ax.angle_deg;
        comps.append(cj);
      }
      sj["components"] = comps;
      spreads.append(sj);
    }
    j["spreads"] = spreads;
  } else {
    j["why"] = c.why;
    if (!a.failing_limit.empty()) {
      j["failing_limit"] = a.failing_limit;
      j["failing_ratio"] = a.failing_ratio;
    }
  }
  j["evaluations"] = c.evaluations;
  j["status"] = to_string(a.status);
  return j;
}

// The fields of `strewn solve aim --format json`.
py::dict site_aim(const Site& s, const std::string& source, const std::string& target,
                  const std::optional<double>& min_target, double search_half_width, int grid, double tolerance) {
  AimQuery q;
  q.source = source;
  q.target = target;
  q.min_target = min_target;
  q.search_half_width = search_half_width;
  q.grid = grid;
  q.tolerance = tolerance;
  const AimAnswer a = interruptible([&](const ProgressFn& progress) { return solve_aim(s, q, progress); });
  const BestPoint& b = a.best;
  py::dict j = site_header(s);
  j["problem"] = "aim";
  j["objective"] = a.objective;
  j["current_aim"] = vec(a.current_aim);
  j["current_target_p"] = a.current_target_p;
  j["current_keep_out_total_p"] = a.current_keep_out_total;
  j["found"] = b.found;
  if (b.found) {
    j["aim"] = vec(b.x);
    j["final_step_m"] = b.step;
    j["target_p"] = a.target_p;
    j["target_abs_err"] = a.target_abs_err;
    j["keep_out_total_p"] = a.keep_out_total;
  } else {
    j["why"] = b.why;
    if (!a.failing_limit.empty()) {
      j["failing_limit"] = a.failing_limit;
      j["failing_at"] = vec(a.failing_at);
      j["failing_ratio"] = a.failing_ratio;
    }
  }
  j["evaluations"] = b.evaluations;
  j["status"] = to_string(a.status);
  return j;
}

// One spacing's record, as `strewn solve spacing --format json` writes it in a metric site
// (cli/output/design_output.cpp, spacing_json): lengths in metres, litres.
py::dict spacing_record(const SpacingCheck& c) {
  py::dict j;
  j["spacing_m"] = c.spacing_m;
  j["heads"] = c.heads;
  j["run_hours"] = c.run_hours;
  j["cu_percent"] = c.cu;
  j["du_percent"] = c.du;
  if (c.row_spacing_m > 0.0) j["row_spacing_m"] = c.row_spacing_m;
  py::list limits;
  for (const SpacingLimit& l : c.limits) {
    py::dict lj;
    lj["limit"] = l.name;
    lj["unit"] = l.zone.empty() ? "%" : "L";
    lj["value"] = l.value;
    lj["target"] = l.target;
    lj["margin"] = l.margin;
    lj["holds"] = l.holds();
    limits.append(lj);
  }
  if (!c.limits.empty()) j["limits"] = limits;
  return j;
}

// The fields of `strewn solve spacing --format json` (metres and litres, whatever the site's
// unit system: the module is in metres throughout).
py::dict site_spacing(const Site& s, const std::string& layout, const std::optional<double>& min_cu,
                      const std::optional<double>& min_du, const std::optional<double>& max_litres_per_zone, double least,
                      double most, int steps, double tolerance_m) {
  SpacingQuery q;
  q.layout = layout;
  q.min_cu = min_cu;
  q.min_du = min_du;
  q.max_litres_per_zone = max_litres_per_zone;
  q.least_of_radius = least;
  q.most_of_radius = most;
  q.steps = steps;
  q.tolerance_m = tolerance_m;
  const SpacingAnswer a = interruptible([&](const ProgressFn& progress) { return solve_spacing(s, q, progress); });
  py::dict j = site_header(s);
  j["problem"] = "spacing";
  j["layout"] = a.layout;
  j["found"] = a.found;
  py::list window;
  window.append(a.least_m);
  window.append(a.most_m);
  j["window"] = window;
  j["judged_on"] = "water on its upper bound (amount + error bound); CU and DU on the cans' central depths";
  if (a.found) {
    j["answer"] = spacing_record(a.at);
    j["holds_over_whole_window"] = a.holds_to_end;
    if (a.beyond) j["beyond"] = spacing_record(*a.beyond);
  } else {
    j["why"] = a.why;
    j["smallest_tried"] = spacing_record(a.at);
  }
  j["evaluations"] = a.evaluations;
  return j;
}

// The fields of `strewn deposition --format json` (cli/output/deposition_output.cpp).
py::dict site_deposition(const Site& s) {
  const Deposition d = [&] {
    py::gil_scoped_release release;
    return compute_deposition(s);
  }();
  py::dict j = site_header(s);
  j["hours"] = s.deposition->hours;
  j["amount_unit"] = d.unit;
  j["depth_unit"] = d.depth_unit;
  j["emitted"] = d.emitted;
  if (s.deposition->grid) {
    py::dict g;
    g["on_grid"] = d.on_grid;
    g["on_grid_err"] = d.on_grid_err;
    g["off_grid"] = d.off_grid;
    g["off_grid_err"] = d.off_grid_err;
    g["cu_percent"] = d.cu;
    g["du_low_quarter_percent"] = d.du;
    g["cans_outside_site"] = d.cans_outside_site;
    g["mean_depth"] = d.mean_depth;
    g["min_depth"] = d.min_depth;
    g["max_depth"] = d.max_depth;
    py::dict sc;  // as scheduling_json in cli/output/deposition_output.cpp, less its conventions
    sc["share_asked"] = d.sc_share;
    if (d.sc) {
      sc["value"] = d.sc->sc;
      sc["window_share"] = d.sc->window.share;
      sc["window_mean_depth"] = d.sc->window_mean;
      sc["window_rows"] = d.sc->window_rows;
      sc["window_columns"] = d.sc->window_columns;
      sc["first_row"] = d.sc->first_row + 1;
      sc["first_column"] = d.sc->first_column + 1;
    } else {
      sc["value"] = py::none();
      sc["why"] = "the driest window caught nothing";
    }
    g["scheduling_coefficient"] = sc;
    j["grid"] = g;
    py::list cans;
    for (const Can& c : d.cans) {
      py::dict cj;
      cj["x"] = c.centre.x();
      cj["y"] = c.centre.y();
      cj["depth"] = c.depth;
      cj["depth_err"] = c.depth_err;
      cj["cell_mean_depth"] = c.cell_depth;
      cj["cell_amount"] = c.cell_amount;
      cj["cell_amount_err"] = c.cell_amount_err;
      cans.append(cj);
    }
    j["cans"] = cans;
  }
  py::list zones;
  for (const ZoneShare& z : d.zones) {
    py::dict zj;
    zj["name"] = z.zone;
    zj["role"] = z.role;
    zj["amount"] = z.amount;
    zj["amount_err"] = z.amount_err;
    zj["fraction"] = z.fraction;
    zones.append(zj);
  }
  j["zones"] = zones;
  if (d.has_site) {
    py::dict o;
    o["amount"] = d.off_site;
    o["amount_err"] = d.off_site_err;
    o["fraction"] = d.off_site / d.emitted;
    j["off_site"] = o;
  }
  // Sprinkler heads (strewn/head.hpp): the CLI's fields, in metres, L/min, mm/h and mm (the
  // module is metric whatever the file's units, as its lengths are metres).
  if (!d.heads.empty()) {
    py::list heads;
    for (const HeadRate& h : d.heads) {
      py::dict hj;
      hj["name"] = h.name;
      hj["layout"] = h.layout;
      hj["x"] = h.position.x();
      hj["y"] = h.position.y();
      hj["radius"] = h.radius_m;
      hj["arc_deg"] = h.sweep_deg;
      hj["flow"] = h.flow_l_per_min;
      hj["own_rate"] = h.own_rate_mm_per_h;
      hj["share_rate"] = h.share_mm_per_h;
      heads.append(hj);
    }
    j["heads"] = heads;
    py::dict p;
    if (d.area_m2 > 0.0) {
      p["area_from"] = d.area_from;
      p["area"] = d.area_m2;
      p["rate"] = d.rate_mm_per_h;
    }
    if (!d.cans.empty()) {
      p["catch_rate"] = d.catch_rate_mm_per_h;
      p["catch_rate_err"] = d.catch_rate_err;
    }
    if (d.area_m2 > 0.0 || !d.cans.empty()) j["precipitation"] = p;
    if (d.run_time) {
      py::dict t;
      t["target_depth"] = *s.deposition->target_depth_mm;
      t["basis"] = d.run_time->basis;
      t["minutes"] = 60.0 * d.run_time->hours;
      t["minutes_err"] = 60.0 * d.run_time->hours_err;
      t["note"] = "Run time: target depth / rate. With the allowance: divided by DU (low quarter) / 100, so\n"
                  "that the driest quarter gets about the target (common practice).";
      if (d.run_time->with_allowance_hours) {
        t["with_allowance_minutes"] = 60.0 * *d.run_time->with_allowance_hours;
        t["with_allowance_minutes_err"] = 60.0 * *d.run_time->with_allowance_err;
      }
      j["run_time"] = t;
    }
  }
  return j;
}

// A point in metres to the millimetre at any distance from the origin (strewn/position_text.hpp).
std::string repr_vec(const Vec2& v) { return position_text(v); }

}  // namespace

PYBIND11_MODULE(_strewn, m) {
  m.doc() = "strewn engine bindings (use the `strewn` package, not this module directly)";
  m.attr("__version__") = STREWN_VERSION_STRING;
  py::register_exception<input_error>(m, "InputError", PyExc_ValueError);

  py::class_<Gaussian>(m, "Normal")
      .def(py::init([](const Vec2& mean, const Mat2& cov) { return Gaussian::from_covariance(mean, cov); }),
           py::arg("mean"), py::arg("cov"))
      .def_static("from_axes", &Gaussian::from_axes, py::arg("mean"), py::arg("sigma_major"),
                  py::arg("sigma_minor"), py::arg("angle_deg") = 0.0)
      .def_static("from_cep", &Gaussian::from_cep, py::arg("mean"), py::arg("cep"))
      .def_static("from_r95", &Gaussian::from_r95, py::arg("mean"), py::arg("r95"))
      .def_static("from_fraction", &Gaussian::from_fraction_within, py::arg("mean"), py::arg("fraction"),
                  py::arg("radius"))
      .def_property_readonly("mean", [](const Gaussian& g) { return g.mean(); },
                             "The mean (x, y) in metres, a numpy array.\n\nExample: strewn.Normal.from_cep((0, 6), 0.5).mean")
      .def_property_readonly("cov", [](const Gaussian& g) { return g.covariance(); },
                             "The covariance (2 x 2, m^2; for the t and the uniform the family's scale matrix).\n\n"
                             "Example: strewn.Normal.from_cep((0, 6), 0.5).cov")
      .def_property_readonly("cholesky", [](const Gaussian& g) { return g.cholesky(); },
                             "The lower-triangular L with L L^T = cov (m).\n\nExample: strewn.Normal.from_cep((0, 6), 0.5).cholesky")
      .def_property_readonly("axes", [](const Gaussian& g) {
        const auto [major, minor] = sigmas_of(g);
        return py::make_tuple(major, minor, g.axes().angle_deg);
      }, "(sigma_major, sigma_minor, angle_deg): the principal sigmas in metres and the major axis's angle, "
         "degrees counter-clockwise from east.\n\nExample: strewn.Normal.from_axes((0, 0), 1.0, 0.5, 30).axes")
      .def("scaled", &Gaussian::scaled, py::arg("scale"),
           "The same spread with every sigma multiplied by `scale` (covariance by scale^2).\n\n"
           "Example: strewn.Normal.from_cep((0, 6), 0.5).scaled(1.2)")
      .def("moved_to", &Gaussian::moved_to, py::arg("mean"),
           "The same spread about another mean (x, y) in metres.\n\n"
           "Example: strewn.Normal.from_cep((0, 6), 0.5).moved_to((0.2, 6.1))")
      .def(
          "with_family",
          [](const Gaussian& g, const std::string& family, double nu) {
            // nu left at its default 0 for the t: said so, not "nu must be in (0, 1e6] (got 0)"
            if (family == "student_t" && nu == 0.0)
              throw input_error("with_family('student_t') needs nu, its degrees of freedom (> 0), e.g. "
                                "with_family('student_t', nu=4)");
            return g.with_family(ScatterFamily::from_name(family, nu));
          },
          py::arg("family"), py::arg("nu") = 0.0,
          "The same mean and spread (as the family's scale) with another radial family: 'normal', "
          "'student_t' (with nu > 0) or 'uniform' (over the ellipse of semi-axes 2 sigma).\n\n"
          "Example: strewn.Normal.from_cep((0, 6), 0.5).with_family('student_t', nu=4)")
      .def_property_readonly("family", [](const Gaussian& g) { return std::string(g.family().name()); },
                             "The radial family: 'normal', 'student_t', 'uniform' or 'profile'.\n\n"
                             "Example: strewn.Normal.from_cep((0, 6), 0.5).family")
      .def_property_readonly("nu", [](const Gaussian& g) { return g.family().nu(); },
                             "The t's degrees of freedom (0 for the other families).\n\n"
                             "Example: strewn.Normal.from_cep((0, 6), 0.5).with_family('student_t', nu=4).nu")
      .def("__repr__", [](const Gaussian& g) {
        const auto [major, minor] = sigmas_of(g);
        std::ostringstream s;
        s.precision(6);
        s << "strewn.Normal(mean=" << repr_vec(g.mean()) << ", sigma_major=" << major
          << ", sigma_minor=" << minor << ", angle_deg=" << g.axes().angle_deg;
        if (!g.family().is_normal()) s << ", family=" << g.family().describe();
        s << ")";
        return s.str();
      })
      .def(py::pickle(
          // The factor too: an elongated spread built from its axes keeps a factor that the
          // rounded covariance cannot give back (p 3x off at 1e9:1 otherwise).
          // The family's name and nu follow (a state of three is a normal, as pickled before);
          // a profile adds its rows and label, then the arc (first ray and sweep, degrees; a
          // sweep of 0 is the whole circle).
          [](const Gaussian& g) {
            const ScatterFamily& f = g.family();
            if (const RadialProfile* rp = f.radial_profile())
              return py::make_tuple(g.mean(), g.covariance(), g.cholesky(), std::string(f.name()), f.nu(),
                                    rp->distance_m(), rp->rate(), rp->label(), f.arc_from_deg(), f.arc_sweep_deg());
            return py::make_tuple(g.mean(), g.covariance(), g.cholesky(), std::string(f.name()), f.nu());
          },
          [](const py::tuple& t) {
            if (t.size() == 2) return Gaussian::from_covariance(t[0].cast<Vec2>(), t[1].cast<Mat2>());
            const Gaussian g = Gaussian::from_parts(t[0].cast<Vec2>(), t[1].cast<Mat2>(), t[2].cast<Mat2>());
            if (t.size() == 5) return g.with_family(ScatterFamily::from_name(t[3].cast<std::string>(), t[4].cast<double>()));
            if (t.size() == 10) {
              ScatterFamily f = ScatterFamily::profile(RadialProfile(t[5].cast<std::vector<double>>(),
                                                                     t[6].cast<std::vector<double>>(), t[7].cast<std::string>()));
              const double from = t[8].cast<double>(), sweep = t[9].cast<double>();
              if (sweep > 0.0) f = f.with_arc(from, from + sweep);
              return g.with_family(f);
            }
            return g;
          }))
      .def("__copy__", [](const Gaussian& g) { return g; })
      .def("__deepcopy__", [](const Gaussian& g, const py::object&) { return g; }, py::arg("memo"));

  py::class_<ScatterModel>(m, "Mixture")
      .def(py::init([](const std::vector<std::pair<double, Gaussian>>& parts) {
             std::vector<WeightedGaussian> c;
             for (const auto& [w, g] : parts) c.push_back({w, g});
             return ScatterModel::mixture(std::move(c));
           }),
           py::arg("components"))
      .def(py::init<const Gaussian&>(), py::arg("normal"))
      .def_property_readonly("components", [](const ScatterModel& s) {
        py::list out;
        for (const WeightedGaussian& c : s.components()) out.append(py::make_tuple(c.weight, c.gaussian));
        return out;
      }, "The components as a list of (weight, Normal).\n\n"
         "Example: strewn.Mixture([(0.9, strewn.Normal.from_cep((0, 0), 1)), (0.1, strewn.Normal.from_cep((0, 0), 5))]).components")
      .def("__repr__", [](const ScatterModel& s) {
        std::ostringstream o;
        o << "strewn.Mixture(" << s.components().size() << " components)";
        return o.str();
      })
      .def("__copy__", [](const ScatterModel& s) { return s; })
      .def("__deepcopy__", [](const ScatterModel& s, const py::object&) { return s; }, py::arg("memo"))
      .def(py::pickle(
          [](const ScatterModel& s) {
            py::list parts;
            for (const WeightedGaussian& c : s.components()) parts.append(py::make_tuple(c.weight, c.gaussian));
            return py::make_tuple(parts);
          },
          [](const py::tuple& t) {
            std::vector<WeightedGaussian> c;
            for (const auto& item : t[0].cast<py::list>()) {
              const auto part = item.cast<py::tuple>();
              c.push_back({part[0].cast<double>(), part[1].cast<Gaussian>()});
            }
            return ScatterModel::mixture(std::move(c));
          }));
  py::implicitly_convertible<Gaussian, ScatterModel>();

  py::class_<Region>(m, "Region")
      .def_property_readonly("area", [](const Region& r) { return area(r); },
                             "Area in m^2 (holes subtracted). Example: strewn.Region.disk((0, 0), 1).area")
      .def_property_readonly("perimeter", [](const Region& r) { return perimeter(r); },
                             "Length of every loop, holes included, in m.")
      .def_property_readonly("bounds", [](const Region& r) {
        const BoundingBox b = bounds(r);
        return py::make_tuple(b.min.x(), b.min.y(), b.max.x(), b.max.y());
      }, "Bounding box (x_min, y_min, x_max, y_max) in m.")
      .def_property_readonly("loop_count", [](const Region& r) { return r.loops.size(); },
                             "Number of closed loops (outer boundaries and holes).")
      .def_property_readonly("approximation_area", [](const Region& r) { return r.approximation_area; },
                             "Area (m^2) between the exact shape and its polygonised stand-in, 0 for a region\n"
                             "kept exact. Boolean operations on curved shapes polygonise them (to their sagitta);\n"
                             "probability() adds it, piece by piece, times the largest density where each piece lies\n"
                             "(along the operands' chords, even where a thin part was lost whole) to abs_err, so a union of\n"
                             "disks may report 'tolerance not met' at the default sagitta: pass a smaller\n"
                             "sagitta to a.union(b, sagitta=...) for a tighter bound.")
      .def_property_readonly("vertex_move", [](const Region& r) { return r.vertex_move; },
                             "How far (m) a vertex may lie from the point it stands for: 0 unless a boolean\n"
                             "operation computed where edges cross (a few ulps of the coordinates, more where they\n"
                             "cross at a small angle). probability() counts every vertex as moved this far in abs_err.\n"
                             "Example: strewn.Region.rectangle((0, 0), 1, 1).union(strewn.Region.rectangle((0.5, 0.5), 1, 1)).vertex_move")
      .def("translated", [](const Region& r, double dx, double dy) {
        if (!(std::fabs(dx) <= 1e12 && std::fabs(dy) <= 1e12))
          throw input_error("translated: dx and dy must be finite numbers within +-1e12 m (got " + py::str(py::float_(dx)).cast<std::string>() +
                            ", " + py::str(py::float_(dy)).cast<std::string>() + ")");
        py::gil_scoped_release release;
        return transformed(r, Mat2::Identity(), Vec2(dx, dy));
      }, py::arg("dx"), py::arg("dy"),
           "The region moved by (dx, dy) metres.\n\n"
           "Example: strewn.Region.disk((0, 0), 0.25).translated(1.5, 6.0)")
      .def("contains", [](const Region& r, double x, double y) {
        py::gil_scoped_release release;
        return winding_number(r, Vec2(x, y)) != 0;
      }, py::arg("x"), py::arg("y"),
           "Whether the point (x, y), in metres, lies inside (a point exactly on the boundary may go either way).\n\n"
           "Example: strewn.Region.disk((0, 0), 1).contains(0.5, 0.5)  # True")
      .def("_combine", [](const Region& a, const Region& b, const std::string& op, double sagitta) {
        const BooleanOp o = op == "unite" ? BooleanOp::unite : op == "subtract" ? BooleanOp::subtract
                                                                                 : BooleanOp::intersect;
        py::gil_scoped_release release;
        return combine(a, b, o, sagitta);
      })
      .def("__repr__", [](const Region& r) {
        const BoundingBox b = bounds(r);
        std::ostringstream s;
        s.precision(6);
        s << "strewn.Region(" << r.loops.size() << " loop(s), area " << area(r) << " m^2, bounds "
          << repr_vec(b.min) << " - " << repr_vec(b.max) << ")";
        return s.str();
      });

  m.def("_shape", &build_shape, py::arg("kind"), py::arg("params_json"), py::arg("sagitta") = 0.0);
  m.def("_polygon", &polygon_region, py::arg("outer"));
  m.def("_add_plugin_dir", &add_plugin_dir, py::arg("dir"));
  m.def("_shape_kinds", &shape_kinds);
  m.def("_from_wkt", [](const std::string& text) {
    py::gil_scoped_release release;
    return region_from_wkt(text);
  });
  m.def("_from_geojson", [](const std::string& text, bool lon_lat, double lon, double lat, const std::string& feature) {
    GeoJsonOptions o;
    o.positions = lon_lat ? GeoJsonPositions::lon_lat : GeoJsonPositions::site_metres;
    if (lon_lat) o.origin = GeoOrigin{lon, lat};
    o.feature = feature;
    py::gil_scoped_release release;
    return region_from_geojson(text, o);
  });

  result_type = reinterpret_cast<PyTypeObject*>(PyType_FromSpec(&result_spec));
  if (result_type == nullptr) throw py::error_already_set();
  m.attr("Result") = py::reinterpret_borrow<py::object>(reinterpret_cast<PyObject*>(result_type));

  py::class_<Site, std::shared_ptr<Site>>(m, "Site")
      .def_readonly("file", &Site::file, "The scenario file's path, as given to load_site.")
      .def_readonly("name", &Site::site_name, "[site] name.")
      .def_readonly("notes", &Site::notes, "[site] notes (text, may be empty).")
      .def_property_readonly("warnings", [](const Site& s) {
        std::vector<std::string> out;
        for (const Warning& w : s.warnings) out.push_back(w.message);
        return out;
      }, "The scenario's warnings (likely mistakes that were not errors), one line each.")
      .def_property_readonly("_warnings_to_show", [](const Site& s) { return warnings_to_show(s.warnings); })
      .def_property_readonly("units", [](const Site& s) { return std::string(symbol(s.units)); },
                             "[site] units: 'm' or 'ft' (the module's lengths are metres whatever it is).")
      // The site frame's CRS as a PROJ definition: [site] crs as written, the local transverse
      // Mercator about [site] origin, or None for a frame tied to nothing.
      .def_property_readonly("crs", [](const Site& s) -> std::optional<std::string> {
        std::string crs = site_frame_crs(s);
        if (crs.empty()) return std::nullopt;
        return crs;
      }, "The site frame's CRS as a PROJ definition ([site] crs, or the local frame about [site] origin), or None.")
      .def_property_readonly("zone_names", [](const Site& s) {
        std::vector<std::string> out;
        for (const Zone& z : s.zones) out.push_back(z.name);
        return out;
      }, "The zones' names, in the file's order.")
      .def_property_readonly("source_names", [](const Site& s) {
        std::vector<std::string> out;
        for (const Source& src : s.sources) out.push_back(src.name);
        return out;
      }, "The sources' names, in the file's order.")
      .def_property_readonly("zones", [](const Site& s) {
        py::dict out;
        for (const Zone& z : s.zones) out[py::str(z.name)] = z.region;
        return out;
      }, "The zones as {name: Region} (site metres).\n\nExample: site.zones['staff door'].area()")
      .def_property_readonly("sources", [](const Site& s) {
        py::dict out;
        for (const Source& src : s.sources) out[py::str(src.name)] = src.model;
        return out;
      }, "The sources' scatter as {name: Mixture} (a plain spread is a one-component mixture).")
      .def("__repr__", [](const Site& s) {
        return "strewn.Site('" + s.site_name + "', " + std::to_string(s.sources.size()) + " source(s), " +
               std::to_string(s.zones.size()) + " zone(s), file '" + s.file + "')";
      })
      .def("_assess", &site_assess)
      .def("_risk_map", &site_risk_map)
      .def("_solve_clearance", &site_clearance)
      .def("_solve_spread", &site_spread)
      .def("_solve_aim", &site_aim)
      .def("_solve_spacing", &site_spacing)
      .def("_deposition", &site_deposition);
  m.def("_load_site", &load_site_py);

  m.def("_options", &make_options);
  py::class_<IntegrateOptions>(m, "_Options");
  m.def("_probability", [](const Gaussian& model, const Region& region, const IntegrateOptions& options, bool force) {
    return result_object(probability(model, region, options, force));
  });
  m.def("_probability", [](const ScatterModel& model, const Region& region, const IntegrateOptions& options,
                           bool force) { return result_object(probability_mixture(model, region, options, force)); });
  m.def("_make_probability", &make_probability);
  // A Normal overload first, as for _probability: pybind11's implicit conversion of a Normal to
  // the Mixture parameter cost about 5,200 instructions a call (callgrind), half a small polygon.
  m.def("_probability_many", [](const Gaussian& model, const std::vector<const Region*>& regions,
                                const IntegrateOptions& options, int threads, bool force) {
    return probability_many(ScatterModel(model), regions, options, threads, force);
  });
  m.def("_probability_many", &probability_many);
  m.def("_probability_at", [](const Gaussian& model, const Region& footprint,
                              const py::array_t<double, py::array::c_style | py::array::forcecast>& xs,
                              const py::array_t<double, py::array::c_style | py::array::forcecast>& ys,
                              const IntegrateOptions& options, int threads, bool force) {
    return probability_at(ScatterModel(model), footprint, xs, ys, options, threads, force);
  });
  m.def("_probability_at", &probability_at);
  m.def("_fit_impacts", &fit_impacts);
  m.def("_fit_student_t", &fit_student_t_dict);
  m.def("_fit_counts", &fit_counts_dict);
  m.def("_fit_censored", &fit_censored_dict);
  m.def("probability_of_any", &probability_of_any, py::arg("p"), py::arg("events"),
        "probability_of_any(p, events) -> float\n\n"
        "Chance of at least one impact in `events` independent events of per-event probability `p`:\n"
        "-expm1(events * log1p(-p)), exact where 1 - (1 - p)**events cancels. `events` is a count (the\n"
        "events of a session, or events per session x sessions per year), not necessarily whole.\n\n"
        "Example: strewn.probability_of_any(1e-6, 60 * 200)   # per year, 60 throws x 200 sessions");
  m.def("cep_from_sigma", &cep_from_sigma, py::arg("sigma"),
        "cep_from_sigma(sigma) -> float\n\n"
        "CEP (m), the radius holding half the impacts, of a circular spread of `sigma` (m):\n"
        "sigma * sqrt(2 ln 2) (Rayleigh median).\n\n"
        "Example: strewn.cep_from_sigma(0.3)   # 0.353 m");
  m.def("r95_from_sigma", &r95_from_sigma, py::arg("sigma"),
        "r95_from_sigma(sigma) -> float\n\n"
        "R95 (m), the radius holding 95% of the impacts, of a circular spread of `sigma` (m):\n"
        "sigma * sqrt(-2 ln 0.05).\n\n"
        "Example: strewn.r95_from_sigma(0.3)   # 0.734 m");
}
