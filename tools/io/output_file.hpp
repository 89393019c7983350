#pragma once
// Output files appear whole or not at all: written beside the target under a temporary name,
// then renamed over it.
#include <string>

namespace knockon {

// Writes `content` to `path` atomically; throws std::runtime_error naming the path on failure.
void write_file_atomically(const std::string& path, const std::string& content);

// A temporary path in the same directory as `path`, for writers that need a file name
// (e.g. HDF5); rename it with commit_file when complete.
std::string temporary_path_for(const std::string& path);
void commit_file(const std::string& temporary, const std::string& path);

}  // namespace knockon
