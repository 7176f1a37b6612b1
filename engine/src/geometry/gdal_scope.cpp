#include "strewn/gdal_scope.hpp"

#include <cpl_error.h>
#include <gdal.h>

#include <mutex>

namespace strewn {

GdalScope::GdalScope() {
  static std::once_flag registered;
  std::call_once(registered, [] { GDALAllRegister(); });
  CPLPushErrorHandler(CPLQuietErrorHandler);
  CPLErrorReset();
}

GdalScope::~GdalScope() { CPLPopErrorHandler(); }

std::string GdalScope::reason(const std::string& fallback) {
  const char* m = CPLGetLastErrorMsg();
  return m != nullptr && *m != '\0' ? std::string(m) : fallback;
}

bool GdalScope::failed() { return CPLGetLastErrorType() >= CE_Failure; }

}  // namespace strewn
