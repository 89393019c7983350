#pragma once
// A thin RAII layer over the HDF5 C API for writing tables of records: every handle closes itself,
// every failing call throws an h5::Error naming the file and the object, and everything written is
// laid out so that the same input gives the same file bytes (no time stamps, packed zeroed records).
// One thread owns all handles (the C library is built without thread safety).
#include <hdf5.h>

#include <cstddef>
#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "tools/results/output_file.hpp"

namespace knockon::h5 {

class Error : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// While alive, HDF5 does not print its error stack to stderr; the innermost message goes into the
// exception instead. Restores the previous setting when destroyed.
class QuietErrors {
public:
    QuietErrors();
    ~QuietErrors();
    QuietErrors(const QuietErrors&) = delete;
    QuietErrors& operator=(const QuietErrors&) = delete;

private:
    H5E_auto2_t saved_func_ = nullptr;
    void* saved_data_ = nullptr;
    bool saved_ = false;
};

// One owned hid_t and the function that releases it.
class Handle {
public:
    using Closer = herr_t (*)(hid_t);
    Handle() = default;
    Handle(hid_t id, Closer closer) : id_(id), closer_(closer) {}
    Handle(Handle&& other) noexcept;
    Handle& operator=(Handle&& other) noexcept;
    Handle(const Handle&) = delete;
    Handle& operator=(const Handle&) = delete;
    ~Handle();

    hid_t id() const { return id_; }
    // Closes now and reports whether the library accepted it (a file's final flush happens here).
    bool close();
    // Forgets the id without closing it (a file the library failed to flush: closing it again is
    // what crashed).
    void abandon() noexcept;

private:
    hid_t id_ = H5I_INVALID_HID;
    Closer closer_ = nullptr;
};

// Where an object lives, for messages: "<file>: <object>" (or just "<file>").
struct Place {
    std::string file;    // the name shown to the user (the final path, not the temporary one)
    std::string object;  // HDF5 path inside the file, e.g. "/day/timing"; empty for the file itself
    std::string describe() const { return object.empty() ? file : file + ": " + object; }
};

// Throws h5::Error "<place>: <what>: <innermost HDF5 message>" when status/id is negative.
hid_t check(hid_t id, const Place& where, const std::string& what);
herr_t check_status(herr_t status, const Place& where, const std::string& what);

// The kinds of field a record may hold. Strings are fixed-length, UTF-8, null-padded: NumPy reads
// them as bytes ('S<n>') without per-record heap look-ups.
enum class FieldKind { u8, u32, u64, f64, text };

struct Field {
    std::string name;
    FieldKind kind;
    std::size_t text_size = 0;  // bytes, for text (at least 1)
    std::size_t offset = 0;     // filled in by RecordLayout
};

// A packed compound record: the same byte layout in memory and in the file (little-endian fields),
// so records are encoded once into a zeroed byte buffer and no padding bytes reach the file.
class RecordLayout {
public:
    RecordLayout& add(const std::string& name, FieldKind kind);
    // A fixed-length text field of `size` bytes (raised to at least one).
    RecordLayout& add_text(const std::string& name, std::size_t size);

    std::size_t record_size() const { return size_; }
    const std::vector<Field>& fields() const { return fields_; }
    Handle file_type(const Place& where) const;    // little-endian standard types
    Handle memory_type(const Place& where) const;  // native types at the same offsets

private:
    Handle make_type(bool native, const Place& where) const;
    std::vector<Field> fields_;
    std::size_t size_ = 0;
};

class Group;

// An HDF5 file created for writing, with the layout choices of sim/ENGINEERING.md: file format bounds
// V110..V110 and no object time stamps.  Created exclusively (H5F_ACC_EXCL): an existing file or a
// link at `actual_path` makes it fail, it is never truncated or followed.  Closing fails while a
// group or dataset of it is still open, so a file is never taken as complete too early.
class File {
public:
    // `actual_path` is created; `display_name` is what messages call it.
    File(const std::string& actual_path, const std::string& display_name);
    Group root() const;
    // Flushes everything and closes the file; throws if the library reports a failure then, or
    // if closing one of its groups or datasets failed earlier (e.g. a full disk).  After a failed
    // flush the file is left open and the library is not shut down at exit (see hdf5_file.cpp).
    void close();
    const std::string& display_name() const { return name_; }

private:
    std::string name_;
    Handle handle_;
    unsigned failed_closes_at_open_ = 0;
};

class Attributes;

class Group {
public:
    Group(Handle handle, Place place) : handle_(std::move(handle)), place_(std::move(place)) {}
    Group create_group(const std::string& name) const;
    hid_t id() const { return handle_.id(); }
    const Place& place() const { return place_; }
    Attributes attributes() const;

private:
    Handle handle_;
    Place place_;
};

// Scalar attributes on a group or dataset.
class Attributes {
public:
    Attributes(hid_t owner, Place place) : owner_(owner), place_(std::move(place)) {}
    void set_text(const std::string& name, const std::string& value) const;
    void set_i32(const std::string& name, std::int32_t value) const;
    void set_u8(const std::string& name, std::uint8_t value) const;
    void set_u32(const std::string& name, std::uint32_t value) const;
    void set_u64(const std::string& name, std::uint64_t value) const;
    void set_f64(const std::string& name, double value) const;
    // A 1-D array attribute (an empty array has one dimension of size 0).
    void set_f64_array(const std::string& name, const std::vector<double>& values) const;

private:
    void set(const std::string& name, hid_t file_type, hid_t memory_type, const void* value) const;
    hid_t owner_;
    Place place_;
};

// A 1-D extendible dataset of packed records, filled in whole chunks: records are encoded field by
// field into a chunk-sized buffer and appended when it is full (and by flush()).
class RecordTable {
public:
    // Chunks of about 16 K records, fewer for wide records so a chunk stays under 1 MiB (the default
    // chunk cache); shuffle + deflate.
    static std::size_t chunk_records_for(std::size_t record_size);

    RecordTable(const Group& parent, const std::string& name, RecordLayout layout);
    RecordTable(const RecordTable&) = delete;
    RecordTable& operator=(const RecordTable&) = delete;

    // Starts a new (zeroed) record; then give its fields in layout order.
    RecordTable& begin();
    RecordTable& u8(std::uint8_t v);
    RecordTable& u32(std::uint32_t v);
    RecordTable& u64(std::uint64_t v);
    RecordTable& f64(double v);
    RecordTable& text(const std::string& v);  // throws if longer than the field

    // Appends the buffered records to the dataset.
    void flush();
    std::uint64_t size() const { return written_ + buffered_; }
    Attributes attributes() const { return Attributes(handle_.id(), place_); }
    const Place& place() const { return place_; }

private:
    std::byte* next_field(FieldKind kind);

    RecordLayout layout_;
    Place place_;
    Handle handle_;
    Handle memory_type_;
    std::size_t chunk_ = 0;
    std::vector<std::byte> buffer_;
    std::size_t buffered_ = 0;   // complete or started records in buffer_
    std::size_t field_ = 0;      // next field of the current record
    std::uint64_t written_ = 0;  // records already in the dataset
};

// A File that appears at `path` only when complete: created under a temporary name in the same
// directory (output_file.hpp: unpredictable, exclusive, removed on SIGINT/SIGTERM/SIGHUP), renamed
// over `path` by commit().  Destroyed without a commit (an exception, an interrupted run), it
// removes the temporary file, so `path` holds a whole file or nothing new.  A `path` that exists
// and is not a regular file is refused (OutputPathError).  HDF5's error printing is off while it
// lives; failures come as h5::Error instead.
class OutputFile {
public:
    explicit OutputFile(const std::string& path);
    ~OutputFile();
    OutputFile(const OutputFile&) = delete;
    OutputFile& operator=(const OutputFile&) = delete;

    Group root() const;
    // Closes the file (every group and dataset must be closed by then) and renames it into place.
    void commit();
    const std::string& path() const { return path_; }

private:
    void discard() noexcept;
    std::string path_;
    QuietErrors quiet_;
    std::optional<File> file_;
    std::optional<TemporaryFile> temporary_;
    bool committed_ = false;
};

}  // namespace knockon::h5
