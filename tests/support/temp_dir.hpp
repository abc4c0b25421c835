// A fresh temporary directory for one test, removed afterwards: <system temp>/plateau-tests-<pid>/<name>-<n>.
#pragma once

#include <atomic>
#include <filesystem>
#include <fstream>
#include <string>

#include <unistd.h>

namespace plateau::test {

class TempDir {
public:
    explicit TempDir(const std::string& name = "tmp") {
        static std::atomic<int> counter{0};
        path = std::filesystem::temp_directory_path() / ("plateau-tests-" + std::to_string(::getpid())) /
               (name + "-" + std::to_string(counter++));
        std::filesystem::remove_all(path);
        std::filesystem::create_directories(path);
    }
    ~TempDir() {
        std::error_code ec;
        std::filesystem::remove_all(path, ec);
    }
    TempDir(const TempDir&) = delete;
    TempDir& operator=(const TempDir&) = delete;

    // The path of a file in the directory.
    std::string file(const std::string& name) const { return (path / name).string(); }
    // Writes `text` to a file in the directory and returns its path.
    std::string write(const std::string& name, const std::string& text) const {
        std::ofstream(path / name, std::ios::binary) << text;
        return file(name);
    }

    std::filesystem::path path;
};

}  // namespace plateau::test
