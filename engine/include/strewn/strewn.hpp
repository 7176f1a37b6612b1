#ifndef STREWN_STREWN_HPP
#define STREWN_STREWN_HPP

/// \file
/// Everything a program needs to compute impact probabilities with strewn.

#include "strewn/assess.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/contours.hpp"
#include "strewn/deposition.hpp"
#include "strewn/design.hpp"
#include "strewn/error.hpp"
#include "strewn/estimate.hpp"
#include "strewn/exposure.hpp"
#include "strewn/fit.hpp"
#include "strewn/input_file.hpp"
#include "strewn/integrate.hpp"
#include "strewn/owens_t.hpp"
#include "strewn/region.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/region_io.hpp"
#include "strewn/region_ops.hpp"
#include "strewn/scatter_family.hpp"
#include "strewn/scatter_model.hpp"
#include "strewn/risk_map.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site.hpp"
#include "strewn/site_io.hpp"
#include "strewn/site_map.hpp"
#include "strewn/sweep.hpp"
#include "strewn/solve.hpp"
#include "strewn/status.hpp"
#include "strewn/uncertainty.hpp"
#include "strewn/uniformity.hpp"
#include "strewn/units.hpp"
#include "strewn/version.hpp"
#include "strewn/work.hpp"
#include "strewn/distribute.hpp"

#endif
