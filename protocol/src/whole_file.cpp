#include "liveprob/protocol/whole_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstring>
#include <stdexcept>
#include <system_error>
#include <utility>

namespace liveprob::protocol {

namespace {

[[noreturn]] void fail(const std::filesystem::path& path, std::string_view action,
                       std::string_view what, const std::string& reason) {
    throw std::runtime_error(path.string() + ": cannot " + std::string(action) + " " +
                             std::string(what) + ": " + reason);
}

// Closes a descriptor on every path out of a function.
class Descriptor {
public:
    explicit Descriptor(int fd) : fd_(fd) {}
    ~Descriptor() {
        if (fd_ >= 0) ::close(fd_);
    }
    Descriptor(const Descriptor&) = delete;
    Descriptor& operator=(const Descriptor&) = delete;
    int get() const noexcept { return fd_; }
    int release() noexcept { return std::exchange(fd_, -1); }

private:
    int fd_;
};

template <class Bytes>
Bytes read_all(const std::filesystem::path& path, std::string_view what) {
    Descriptor fd(::open(path.c_str(), O_RDONLY | O_CLOEXEC));
    if (fd.get() < 0) fail(path, "open", what, std::strerror(errno));
    struct stat info {};
    if (::fstat(fd.get(), &info) != 0) fail(path, "read", what, std::strerror(errno));
    if (S_ISDIR(info.st_mode)) fail(path, "read", what, "it is a directory");
    Bytes bytes;
    if (S_ISREG(info.st_mode)) bytes.reserve(static_cast<std::size_t>(info.st_size));
    char buffer[65536];
    for (;;) {
        const ssize_t n = ::read(fd.get(), buffer, sizeof buffer);
        if (n == 0) break;
        if (n < 0) {
            if (errno == EINTR) continue;
            fail(path, "read", what, std::strerror(errno));
        }
        bytes.insert(bytes.end(), buffer, buffer + n);
    }
    return bytes;
}

void write_all(int fd, std::span<const std::uint8_t> contents) {
    while (!contents.empty()) {
        const ssize_t n = ::write(fd, contents.data(), contents.size());
        if (n < 0) {
            if (errno == EINTR) continue;
            throw std::system_error(errno, std::generic_category());
        }
        contents = contents.subspan(static_cast<std::size_t>(n));
    }
}

}  // namespace

std::string read_whole_file(const std::filesystem::path& path, std::string_view what) {
    return read_all<std::string>(path, what);
}

std::vector<std::uint8_t> read_whole_file_bytes(const std::filesystem::path& path,
                                                std::string_view what) {
    return read_all<std::vector<std::uint8_t>>(path, what);
}

void write_file_atomically(const std::filesystem::path& path,
                           std::span<const std::uint8_t> contents, std::string_view what) {
    // A name no other writer (thread or process) picks: the process id and a counter.
    static std::atomic<unsigned> counter{0};
    std::filesystem::path temporary = path;
    temporary += ".partial-" + std::to_string(::getpid()) + "-" + std::to_string(counter++);
    Descriptor fd(::open(temporary.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666));
    if (fd.get() < 0) fail(path, "write", what, std::strerror(errno));
    try {
        write_all(fd.get(), contents);
        if (::fsync(fd.get()) != 0) throw std::system_error(errno, std::generic_category());
        if (::close(fd.release()) != 0) throw std::system_error(errno, std::generic_category());
        if (::rename(temporary.c_str(), path.c_str()) != 0)
            throw std::system_error(errno, std::generic_category());
    } catch (const std::system_error& e) {
        ::unlink(temporary.c_str());
        fail(path, "write", what, std::strerror(e.code().value()));
    }
    // The rename is durable once the folder's entry is: flush the folder too.
    const std::filesystem::path folder =
        path.has_parent_path() ? path.parent_path() : std::filesystem::path(".");
    Descriptor dir(::open(folder.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC));
    if (dir.get() < 0 || ::fsync(dir.get()) != 0)
        fail(path, "flush the folder of", what, std::strerror(errno));
}

void write_file_atomically(const std::filesystem::path& path, std::string_view contents,
                           std::string_view what) {
    write_file_atomically(
        path, std::span(reinterpret_cast<const std::uint8_t*>(contents.data()), contents.size()),
        what);
}

}  // namespace liveprob::protocol
