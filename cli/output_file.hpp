#ifndef STREWN_CLI_OUTPUT_FILE_HPP
#define STREWN_CLI_OUTPUT_FILE_HPP

#include <string>

namespace strewn::cli {

// Writes the whole content to a temporary file beside `path`, then renames it into place: a
// reader never sees half a file, and a failed run leaves no file. Throws strewn::input_error
// naming the path when it cannot be written.
void write_file_atomically(const std::string& path, const std::string& content);

}  // namespace strewn::cli

#endif
