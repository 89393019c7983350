#pragma once
// Read-only access to knockon's HDF5 results files (layout: tools/results/HDF5_LAYOUT.md): attributes,
// group members and whole columns of the compound tables.  Every failure throws an h5::Error that
// names the file, the object and what is wrong, so a bad or foreign file gives a clear message
// and never a crash.  Numbers of any integer or float type come back as double (the tables hold
// counts and indices far below 2^53, so the conversion is exact); whole_attribute reads integers
// exactly.  Sizes are checked against the file before anything is allocated: a table may declare
// no more records than its stored bytes can hold (kMaxDeflateRatio), an attribute no more bytes
// than the file has, so a small damaged file cannot make the reader allocate gigabytes.
#include <cstdint>
#include <string>
#include <vector>

#include "tools/results/hdf5_file.hpp"

namespace knockon::h5 {

// True when `path` starts with the HDF5 signature (checked on the file's first bytes, so that a
// YAML scenario is never handed to the HDF5 library).
bool looks_like_hdf5(const std::string& path);

// Deflate compresses at most 1032:1 (zlib's technical notes, "Maximum compression factor"), and
// shuffle does not change sizes: a table whose records would take more than this many times the
// bytes it stores in the file does not hold them.
inline constexpr double kMaxDeflateRatio = 1032.0;

class InputFile {
public:
    // Opens `path` read-only; throws Error "<path>: no such file", "<path>: not an HDF5 file", ...
    explicit InputFile(const std::string& path);
    InputFile(const InputFile&) = delete;
    InputFile& operator=(const InputFile&) = delete;

    const std::string& path() const { return path_; }

    // A group or dataset at this absolute path ("/study/per_day"); parents need not exist.
    bool exists(const std::string& object) const;
    // Names of the links in a group, in name order.
    std::vector<std::string> members(const std::string& group) const;

    bool has_attribute(const std::string& object, const std::string& name) const;
    std::string text_attribute(const std::string& object, const std::string& name) const;
    double number_attribute(const std::string& object, const std::string& name) const;
    // An integer attribute (of any integer type) read exactly; Error if negative or not an integer.
    std::uint64_t whole_attribute(const std::string& object, const std::string& name) const;
    std::vector<double> number_array_attribute(const std::string& object, const std::string& name) const;

    // Field names of a compound table, in order, and its number of records (a 1-D table whose
    // records fit in the bytes it stores).
    std::vector<std::string> fields(const std::string& dataset) const;
    std::size_t rows(const std::string& dataset) const;
    // One whole column; Error naming the table and field if either is missing or of another kind.
    std::vector<double> number_column(const std::string& dataset, const std::string& field) const;
    std::vector<std::string> text_column(const std::string& dataset, const std::string& field) const;

private:
    Handle open_object(const std::string& object) const;
    hid_t open_dataset(const std::string& dataset) const;   // owned by open_
    Handle open_attribute(const std::string& object, const std::string& name) const;
    // Refuses `bytes` of attribute data that the file cannot hold.
    void check_attribute_size(const std::string& object, const std::string& name, double bytes) const;

    QuietErrors quiet_;   // first: HDF5 stays quiet while the file is open
    std::string path_;
    Handle file_;
    double file_size_ = 0.0;   // bytes
    mutable std::string open_path_;   // the table open in open_
    mutable Handle open_;
};

}  // namespace knockon::h5
