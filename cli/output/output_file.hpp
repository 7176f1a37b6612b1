#ifndef STREWN_CLI_OUTPUT_FILE_HPP
#define STREWN_CLI_OUTPUT_FILE_HPP

#include <string>
#include <vector>

namespace strewn::cli {

struct OutputFile {
  std::string path;
  std::string content;
};

// The rules for every file strewn writes (README, "Reliability"):
// * A regular file (or a new one) is replaced atomically: the content goes to a fresh temporary
//   created with O_EXCL (mkstemp) in the target's directory, so a symbolic link planted under any
//   name is never followed; it gets the target's permission bits (and owner, where allowed), or
//   0666 & ~umask for a new file; it is fsynced, then renamed over the target. A target that is
//   a symbolic link is resolved: the file it points to is replaced and the link stays. Rename
//   makes a new file, so other hard links to the target keep the old content.
// * A character device or a FIFO (/dev/null, a pipe) is written in place, never replaced, and
//   never truncated; a FIFO without a reader is refused rather than waited on. Directories, block
//   devices and sockets are refused.
// * A write error names the path and gives the system's reason (strerror).

/// Refuses, before any work is done, outputs that would destroy an input of the same run (the
/// same device and inode, whatever the spelling or links), two outputs naming one file, an
/// output that is a directory or whose directory does not exist. Empty paths are skipped.
void check_outputs(const std::vector<std::string>& outputs, const std::vector<std::string>& inputs);

/// Writes every file or none: every temporary is prepared (written and fsynced) and every special
/// file opened first; if any of that fails the temporaries are removed and nothing is replaced.
/// Only then are the special files written and the temporaries renamed into place.
/// Throws strewn::input_error "cannot write 'PATH': REASON".
void write_outputs(const std::vector<OutputFile>& files);

/// One file, by the same rules.
void write_file_atomically(const std::string& path, const std::string& content);

}  // namespace strewn::cli

#endif
