// The fuzz input as a user's file: written to `name` in a private temporary folder (one per fuzzing process),
// whose path is returned; empty when the file cannot be written (the input is then skipped).
#pragma once

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <string>

#include <unistd.h>

namespace plateau::fuzz {

inline std::string write_work_file(const char* name, const std::uint8_t* data, std::size_t size) {
    static const std::filesystem::path dir = [] {
        const auto d = std::filesystem::temp_directory_path() / ("plateau-fuzz-" + std::to_string(::getpid()));
        std::filesystem::create_directories(d);
        return d;
    }();
    const std::string path = (dir / name).string();
    std::FILE* f = std::fopen(path.c_str(), "wb");
    if (f == nullptr) return {};
    if (size > 0) std::fwrite(data, 1, size, f);
    std::fclose(f);
    return path;
}

}  // namespace plateau::fuzz
