#pragma once
// Read-only access to knockon's HDF5 results files (layout: tools/io/HDF5_LAYOUT.md): attributes,
// group members and whole columns of the compound tables.  Every failure throws an h5::Error that
// names the file, the object and what is wrong, so a bad or foreign file gives a clear message
// and never a crash.  Numbers of any integer or float type come back as double (the tables hold
// counts and indices far below 2^53, so the conversion is exact).
#include <cstdint>
#include <string>
#include <vector>

#include "tools/io/hdf5_file.hpp"

namespace knockon::h5 {

// True when `path` starts with the HDF5 signature (checked on the file's first bytes, so that a
// YAML scenario is never handed to the HDF5 library).
bool looks_like_hdf5(const std::string& path);

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
    std::vector<double> number_array_attribute(const std::string& object, const std::string& name) const;

    // Field names of a compound table, in order, and its number of records.
    std::vector<std::string> fields(const std::string& dataset) const;
    std::size_t rows(const std::string& dataset) const;
    // One whole column; Error naming the table and field if either is missing or of another kind.
    std::vector<double> number_column(const std::string& dataset, const std::string& field) const;
    std::vector<std::string> text_column(const std::string& dataset, const std::string& field) const;

private:
    Handle open_object(const std::string& object) const;
    Handle open_dataset(const std::string& dataset) const;
    Handle open_attribute(const std::string& object, const std::string& name) const;

    QuietErrors quiet_;   // first: HDF5 stays quiet while the file is open
    std::string path_;
    Handle file_;
};

}  // namespace knockon::h5
