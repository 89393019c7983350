#include "tools/io/output_file.hpp"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <stdexcept>
#include <unistd.h>

namespace knockon {

std::string temporary_path_for(const std::string& path) {
    return path + ".partial-" + std::to_string(::getpid());
}

void commit_file(const std::string& temporary, const std::string& path) {
    std::error_code ec;
    std::filesystem::rename(temporary, path, ec);
    if (ec) {
        std::error_code ignored;
        std::filesystem::remove(temporary, ignored);
        throw std::runtime_error(path + ": cannot write: " + ec.message());
    }
}

void write_file_atomically(const std::string& path, const std::string& content) {
    const std::string tmp = temporary_path_for(path);
    {
        std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
        if (!out) throw std::runtime_error(path + ": cannot open for writing");
        out << content;
        out.flush();
        if (!out) {
            out.close();
            std::remove(tmp.c_str());
            throw std::runtime_error(path + ": write failed");
        }
    }
    commit_file(tmp, path);
}

}  // namespace knockon
