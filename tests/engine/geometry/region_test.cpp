// Regions: areas, orientation, winding, transforms, polygonisation, booleans and validity.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/error.hpp"
#include "strewn/region_ops.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

TEST_CASE("areas are exact for polygons, disks, ellipses and sectors", "[region]") {
  CHECK(area(rectangle({0, 0}, {2, 3})) == Approx(6.0).epsilon(1e-15));
  CHECK(area(disk({1, 1}, 2.0)) == Approx(4 * kPi).epsilon(1e-14));
  Mat2 axes;
  axes << 3.0, 0.0, 0.0, 0.5;
  CHECK(area(ellipse({0, 0}, rotation(0.3) * axes)) == Approx(1.5 * kPi).epsilon(1e-14));
  // Annular sector: (t2 - t1)/2 (r2^2 - r1^2).
  CHECK(area(ring_sector({0, 0}, 1.0, 2.0, 0.2, 1.7)) == Approx(0.75 * 3.0).epsilon(1e-14));
}

TEST_CASE("normalisation orients outer loops counter-clockwise and holes clockwise", "[region]") {
  Region r;
  Loop outer, hole;
  const std::vector<Vec2> o = {{0, 0}, {0, 4}, {4, 4}, {4, 0}};  // clockwise as given
  const std::vector<Vec2> h = {{1, 1}, {3, 1}, {3, 3}, {1, 3}};  // counter-clockwise as given
  for (std::size_t i = 0; i < 4; ++i) {
    outer.push_back(Edge::segment(o[i], o[(i + 1) % 4]));
    hole.push_back(Edge::segment(h[i], h[(i + 1) % 4]));
  }
  r.loops = {outer, hole};
  const Region n = normalised(r);
  CHECK(signed_area(n.loops[0]) > 0);
  CHECK(signed_area(n.loops[1]) < 0);
  CHECK(area(n) == Approx(12.0));
  CHECK(winding_number(n, {0.5, 0.5}) == 1);
  CHECK(winding_number(n, {2, 2}) == 0);
  CHECK(winding_number(n, {5, 2}) == 0);
}

TEST_CASE("winding numbers of arcs agree with geometry, including rays through vertices",
          "[region]") {
  const Region s = ring_sector({0, 0}, 0.5, 2.0, 0.0, 6.0);
  CHECK(winding_number(s, {0, 0}) == 0);       // the ray runs along an edge
  CHECK(winding_number(s, {1, 0.1}) == 1);
  CHECK(winding_number(s, {1, -0.1}) == 0);    // in the missing wedge
  CHECK(winding_number(s, {-1, 0}) == 1);
  CHECK(winding_number(disk({0, 0}, 1.0), {0, 0}) == 1);
  CHECK(winding_number(disk({0, 0}, 1.0), {0.999, 0}) == 1);
  CHECK(winding_number(disk({0, 0}, 1.0), {1.001, 0}) == 0);
}

TEST_CASE("an affine map with a reflection keeps the region on the left", "[region]") {
  Mat2 flip;
  flip << -1, 0, 0, 1;
  const Region r = transformed(disk({2, 0}, 1.0), flip, {0, 0});
  CHECK(area(r) == Approx(kPi).epsilon(1e-14));
  CHECK(winding_number(r, {-2, 0}) == 1);
}

TEST_CASE("polygonisation records the area it moved", "[region]") {
  const Region d = disk({0, 0}, 1.0);
  const Region p = polygonised(d, 1e-4);
  CHECK(area(d) - area(p) == Approx(p.approximation_area).epsilon(1e-6));
  CHECK(p.approximation_area < 1e-3);
}

TEST_CASE("boolean operations combine areas", "[region]") {
  const Region a = rectangle({0, 0}, {2, 2}), b = rectangle({1, 1}, {3, 3});
  CHECK(area(combine(a, b, BooleanOp::unite, 1e-6)) == Approx(7.0));
  CHECK(area(combine(a, b, BooleanOp::subtract, 1e-6)) == Approx(3.0));
  CHECK(area(combine(a, b, BooleanOp::intersect, 1e-6)) == Approx(1.0));
  const Region ring = combine(disk({0, 0}, 2.0), disk({0, 0}, 1.0), BooleanOp::subtract, 1e-6);
  // The polygonised ring lies within its recorded approximation area of the true 3 pi, and the
  // record is neither zero nor inflated: the chords of both circles give 1.26e-5 m^2, three times
  // the net deviation of -4.2e-6 (the outer circle's chords remove area, the inner's add some
  // back). Before, area + approximation_area == 3 pi at 1e-5 relative (9.4e-5 m^2, 7.5 times the
  // record) passed with the record zeroed; deliberate fault that made this fail: combine()
  // setting approximation_area to 0.
  CHECK(std::fabs(area(ring) - 3 * kPi) <= ring.approximation_area);
  CHECK(ring.approximation_area <= 4 * std::fabs(area(ring) - 3 * kPi));
  CHECK(winding_number(ring, {0, 0}) == 0);
  CHECK(winding_number(ring, {1.5, 0}) == 1);
}

TEST_CASE("validity checks name the fault", "[region][errors]") {
  Region bow;
  const std::vector<Vec2> pts = {{0, 0}, {1, 1}, {1, 0}, {0, 1}};
  Loop l;
  for (std::size_t i = 0; i < 4; ++i) l.push_back(Edge::segment(pts[i], pts[(i + 1) % 4]));
  bow.loops.push_back(l);
  const Validity v = check_validity(bow);
  CHECK_FALSE(v.valid);
  CHECK_THAT(v.fault, Catch::Contains("self-intersection") && Catch::Contains("0.5"));

  Region spike;
  const std::vector<Vec2> sp = {{0, 0}, {2, 0}, {2, 2}, {2, 3}, {2, 2}, {0, 2}};
  Loop s;
  for (std::size_t i = 0; i < sp.size(); ++i) s.push_back(Edge::segment(sp[i], sp[(i + 1) % sp.size()]));
  spike.loops.push_back(s);
  const Validity vs = check_validity(spike);
  CHECK_FALSE(vs.valid);
  CHECK_THAT(vs.fault, Catch::Contains("spike") || Catch::Contains("self-intersection"));

  CHECK(check_validity(rectangle({0, 0}, {1, 1})).valid);
  CHECK(check_validity(disk({0, 0}, 1)).valid);
  CHECK_FALSE(check_validity(Region{}).valid);
}

TEST_CASE("normalisation rejects open loops and loops without area", "[region][errors]") {
  Region open;
  open.loops.push_back({Edge::segment({0, 0}, {1, 0}), Edge::segment({1, 0}, {1, 1})});
  CHECK_THROWS_WITH(normalised(open), Catch::Contains("not closed"));
  Region flat;
  flat.loops.push_back({Edge::segment({0, 0}, {1, 0}), Edge::segment({1, 0}, {0, 0})});
  CHECK_THROWS_WITH(normalised(flat), Catch::Contains("no area"));
}

TEST_CASE("region builders give the shapes a plugin gives, and refuse malformed input", "[region][errors]") {
  // Areas: a*b*pi for an ellipse, (t2 - t1)/2 (r2^2 - r1^2) for a ring sector (exact for arcs).
  CHECK(area(rectangle({1, 2}, {4, 3})) == Approx(3.0).epsilon(1e-15));
  Mat2 axes;
  axes << 2.0, 0.0, 0.0, 0.5;
  CHECK(area(ellipse({3, -1}, axes)) == Approx(kPi).epsilon(1e-14));
  CHECK(area(ring_sector({0, 0}, 1.0, 3.0, 0.5, 2.0)) == Approx(0.75 * 8.0).epsilon(1e-14));
  // A clockwise polygon is turned counter-clockwise, as normalised() does for a plugin's loop.
  const Region cw = polygon({{0, 0}, {0, 1}, {1, 1}, {1, 0}});
  CHECK(signed_area(cw.loops.front()) == Approx(1.0));
  CHECK_THROWS_AS(polygon({{0, 0}, {1, 1}}), input_error);
  CHECK_THROWS_AS(disk({0, 0}, 0.0), input_error);
  CHECK_THROWS_AS(ring_sector({0, 0}, 2.0, 1.0, 0.0, 1.0), input_error);
  CHECK_THROWS_AS(ring_sector({0, 0}, 1.0, 2.0, 1.0, 1.0), input_error);
}
