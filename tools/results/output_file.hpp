#pragma once
// Output files appear whole or not at all, and writing one never harms another file:
// - a file is written beside its target under a temporary name that cannot be guessed
//   ("<target>.partial-<pid>-<random>") and is created exclusively (O_CREAT|O_EXCL|O_NOFOLLOW,
//   or HDF5's H5F_ACC_EXCL): a link planted under that name makes the creation fail and another
//   name is tried, it is never followed;
// - the complete file is renamed over the target.  A target that exists and is not a regular
//   file (a device node, a FIFO, a directory, a symbolic link) is refused, never replaced nor
//   followed;
// - a temporary file is removed when its writer fails or gives up, and on SIGINT, SIGTERM and
//   SIGHUP by remove_temporary_files() (called from the handlers in tools/knockon/interrupt).
#include <functional>
#include <stdexcept>
#include <string>
#include <vector>

namespace knockon {

// An output path that must not be written (bad input: exit status 2, not a failure while running).
struct OutputPathError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// Refuses (OutputPathError naming the path and the reason) an empty path, a path that is the same
// file as one of `inputs` (same device and inode, so also through links), and a path that exists
// and is not a regular file (a symbolic link included).  Commands call it before any work.
void check_output_path(const std::string& path, const std::vector<std::string>& inputs = {});

// Writes `content` to `path` as above; throws OutputPathError or std::runtime_error naming the path.
void write_file_atomically(const std::string& path, const std::string& content);

// The temporary file of one output, for writers that create the file themselves (HDF5).
class TemporaryFile {
public:
    // create(name) must create a new file at `name` exclusively, without following a link; it
    // returns false when the name turns out to be taken (another name is then tried) and throws on
    // any other failure.  Refuses a target that exists and is not a regular file first.
    using Creator = std::function<bool(const std::string& name)>;
    TemporaryFile(const std::string& target, const Creator& create);
    ~TemporaryFile();  // removes the file unless committed
    TemporaryFile(const TemporaryFile&) = delete;
    TemporaryFile& operator=(const TemporaryFile&) = delete;

    const std::string& name() const { return name_; }
    const std::string& target() const { return target_; }
    // Renames the complete, closed file over the target (checked again: it must still be absent
    // or a regular file).  On failure the temporary file is removed and the error thrown.
    void commit();
    // Removes the temporary file now (idempotent).
    void discard() noexcept;

private:
    std::string target_, name_;
    int slot_ = -1;  // its entry in the list remove_temporary_files() works through
};

// Removes every temporary file neither committed nor discarded yet.  Async-signal-safe (it only
// reads a fixed table and calls unlink), for handlers of fatal signals.
void remove_temporary_files() noexcept;

}  // namespace knockon
