#include "tools/results/output_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <sys/syscall.h>
#include <time.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <random>

namespace knockon {

namespace {

// ---- the temporary files a fatal signal must remove ------------------------------------------
// A fixed table, so that a signal handler can walk it without locks or allocation: a slot is
// claimed (free -> busy), its path filled in, then published (busy -> creating) while its file is
// being created, and live once it is; the handler unlinks creating and live slots only.  A signal
// handled by another thread than the one creating the file (any thread may take a signal) could
// unlink the name just before the creation makes it: the handler then waits for the creation to end
// and unlinks it again.
constexpr std::size_t kSlots = 64;
constexpr std::size_t kPathBytes = 4096;
enum SlotState : int { kFree = 0, kBusy = 1, kLive = 2, kCreating = 3 };
struct Slot {
    std::atomic<int> state{kFree};
    std::atomic<long> creator{0};   // kernel thread id of the thread creating the file
    char path[kPathBytes] = {};
};
static_assert(std::atomic<int>::is_always_lock_free, "the signal handler needs lock-free flags");
Slot g_slots[kSlots];

int register_temporary(const std::string& name) {
    std::error_code ec;
    const std::string absolute = std::filesystem::absolute(name, ec).string();  // still right after a chdir
    const std::string& path = ec ? name : absolute;
    if (path.size() >= kPathBytes) throw std::runtime_error(name + ": path too long");
    for (std::size_t i = 0; i < kSlots; ++i) {
        int expected = kFree;
        if (!g_slots[i].state.compare_exchange_strong(expected, kBusy)) continue;
        std::memcpy(g_slots[i].path, path.c_str(), path.size() + 1);
        g_slots[i].creator.store(static_cast<long>(::syscall(SYS_gettid)));
        g_slots[i].state.store(kCreating, std::memory_order_release);
        return static_cast<int>(i);
    }
    throw std::runtime_error(name + ": too many output files open at once");
}

void unregister_temporary(int slot) noexcept {
    if (slot < 0) return;
    g_slots[slot].state.store(kBusy);
    g_slots[slot].path[0] = '\0';
    g_slots[slot].state.store(kFree, std::memory_order_release);
}

// ---- names and checks --------------------------------------------------------------------------

std::string random_suffix() {
    static std::random_device device;  // the kernel's generator: names others cannot predict
    static const char digits[] = "0123456789abcdefghijklmnopqrstuvwxyz";
    std::string s;
    for (int i = 0; i < 10; ++i) s += digits[device() % 36];
    return s;
}

std::string kind_of(mode_t mode) {
    if (S_ISDIR(mode)) return "a directory";
    if (S_ISFIFO(mode)) return "a FIFO (named pipe)";
    if (S_ISCHR(mode)) return "a character device";
    if (S_ISBLK(mode)) return "a block device";
    if (S_ISSOCK(mode)) return "a socket";
    return "not a regular file";
}

// Refuses a target that exists and is not a regular file.  A symbolic link is refused too:
// following it would let whoever planted it choose where the file goes, and replacing it could
// remove a link the system needs (/dev/stdout, written as root with stdout sent to a file).
void refuse_special_target(const std::string& path) {
    struct stat st {};
    if (::lstat(path.c_str(), &st) != 0) return;
    if (S_ISLNK(st.st_mode)) {
        std::error_code ec;
        const std::string to = std::filesystem::read_symlink(path, ec).string();
        throw OutputPathError(path + ": is a symbolic link" + (ec ? std::string() : " to " + to) +
                              "; knockon neither follows nor replaces a link at an output path: give the "
                              "file's own path (nothing written)");
    }
    if (!S_ISREG(st.st_mode))
        throw OutputPathError(path + ": is " + kind_of(st.st_mode) +
                              "; knockon writes only regular files and replaces nothing else (nothing written)");
}

// Something (a file, a link, ...) stands at `name`.  Other failures are left to the creation to report.
bool name_taken(const std::string& name) {
    struct stat st {};
    return ::lstat(name.c_str(), &st) == 0;
}

// An open file descriptor, closed once.
struct Descriptor {
    int fd = -1;
    ~Descriptor() {
        if (fd >= 0) ::close(fd);
    }
};

}  // namespace

void check_output_path(const std::string& path, const std::vector<std::string>& inputs) {
    if (path.empty()) throw OutputPathError("the output path is empty");
    struct stat out {};
    if (::stat(path.c_str(), &out) == 0) {  // not there yet: it cannot be an input
        for (const std::string& input : inputs) {
            struct stat in {};
            if (::stat(input.c_str(), &in) == 0 && in.st_dev == out.st_dev && in.st_ino == out.st_ino)
                throw OutputPathError(path + ": is the input file " + input +
                                      "; writing there would destroy it (choose another output path; nothing written)");
        }
    }
    refuse_special_target(path);
}

// ---------------------------------------------------------------------------------------------

TemporaryFile::TemporaryFile(const std::string& target, const Creator& create) : target_(target) {
    check_output_path(target_);
    const std::string base = target_ + ".partial-" + std::to_string(::getpid()) + "-";
    // A few names at most: a name is taken only if someone guessed it or planted a link there.
    for (int attempt = 0; attempt < 100; ++attempt) {
        const std::string name = base + random_suffix();
        if (name_taken(name)) continue;
        // Registered before it exists, so that a signal during creation cannot leave it behind.
        const int slot = register_temporary(name);
        bool made = false;
        try {
            made = create(name);
        } catch (...) {
            ::unlink(name.c_str());  // free just before: whatever stands there now is this attempt's
            unregister_temporary(slot);
            throw;
        }
        if (!made) {
            unregister_temporary(slot);  // not ours: left alone
            continue;
        }
        g_slots[slot].state.store(kLive, std::memory_order_release);
        name_ = name;
        slot_ = slot;
        return;
    }
    throw std::runtime_error(target_ + ": cannot create a temporary file beside it (every name tried was taken)");
}

TemporaryFile::~TemporaryFile() { discard(); }

void TemporaryFile::discard() noexcept {
    if (slot_ < 0) return;
    ::unlink(name_.c_str());
    unregister_temporary(slot_);
    slot_ = -1;
}

void TemporaryFile::commit() {
    if (slot_ < 0) throw std::logic_error(target_ + ": temporary file already committed or discarded");
    try {
        refuse_special_target(target_);  // it may have appeared while the file was written
    } catch (...) {
        discard();
        throw;
    }
    if (std::rename(name_.c_str(), target_.c_str()) != 0) {
        const int error = errno;
        discard();
        throw std::runtime_error(target_ + ": cannot write: " + std::strerror(error));
    }
    unregister_temporary(slot_);
    slot_ = -1;
}

void remove_temporary_files() noexcept {
    const long self = static_cast<long>(::syscall(SYS_gettid));
    for (Slot& s : g_slots) {
        const int state = s.state.load(std::memory_order_acquire);
        if (state != kLive && state != kCreating) continue;
        ::unlink(s.path);
        if (state != kCreating || s.creator.load() == self) continue;   // interrupted here: never made now
        // Another thread is creating it: wait (1 s at most) until it has, and unlink it again.
        for (int i = 0; i < 1000 && s.state.load(std::memory_order_acquire) == kCreating; ++i) {
            struct timespec ms {0, 1'000'000};
            ::nanosleep(&ms, nullptr);
        }
        if (s.state.load(std::memory_order_acquire) == kLive) ::unlink(s.path);
    }
}

// ---------------------------------------------------------------------------------------------

void write_file_atomically(const std::string& path, const std::string& content) {
    Descriptor file;
    TemporaryFile tmp(path, [&](const std::string& name) {
        file.fd = ::open(name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
        if (file.fd >= 0) return true;
        if (errno == EEXIST || errno == ELOOP) return false;
        throw std::runtime_error(path + ": cannot create a file there: " + std::strerror(errno));
    });
    const char* p = content.data();
    std::size_t left = content.size();
    while (left > 0) {
        const ssize_t n = ::write(file.fd, p, left);
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) throw std::runtime_error(path + ": write failed: " + std::strerror(n < 0 ? errno : EIO));
        p += n;
        left -= static_cast<std::size_t>(n);
    }
    const int fd = file.fd;
    file.fd = -1;
    if (::close(fd) != 0) throw std::runtime_error(path + ": write failed: " + std::strerror(errno));
    tmp.commit();
}

}  // namespace knockon
