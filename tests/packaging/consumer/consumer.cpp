// Uses the installed library and its installed plugins: a disk's probability under a circular
// spread, checked against the Rayleigh closed form 1 - exp(-R^2 / (2 s^2)).
#include <cmath>
#include <cstdio>
#include <strewn/strewn.hpp>

int main() {
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path();
  const strewn::Region disk = shapes.build("disk", R"({"centre": [0, 0], "radius": 2})");
  const auto g = strewn::Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  const strewn::Estimate e = strewn::integrate(g, disk);
  const double ref = -std::expm1(-2.0);
  std::printf("strewn %s: p = %.15g (closed form %.15g)\n", strewn::library_version(), e.p, ref);
  return std::fabs(e.p - ref) <= 1e-12 ? 0 : 1;
}
