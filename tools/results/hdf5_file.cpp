#include "tools/results/hdf5_file.hpp"

#include <algorithm>
#include <atomic>
#include <cstdlib>
#include <cstring>
#include <utility>

namespace knockon::h5 {

namespace {

// ---- the library's end --------------------------------------------------------------------------
// HDF5 installs an exit handler that closes every file still open.  On a file whose final flush
// had failed (a full disk) it crashed (SIGSEGV in its close callback), turning a clean error into
// a core dump.  So the library is told not to install it (this must happen before its first
// call, hence a static initializer), and ours shuts the library down only when no file or object
// failed to close; otherwise the operating system reclaims everything at exit.
std::atomic<unsigned> g_failed_closes{0};
std::atomic<bool> g_file_abandoned{false};
std::string g_close_failure;   // what the last failed close said (one thread owns every handle)

void shut_down_library() {
    if (g_failed_closes.load() == 0 && !g_file_abandoned.load()) H5close();
}

[[maybe_unused]] const bool g_exit_handler_installed = [] {
    if (H5dont_atexit() < 0) return false;  // the library was already in use: its handler stays
    std::atexit(shut_down_library);
    return true;
}();

// The message of the innermost failing library function: it says what actually went wrong
// ("unable to open file: name = ..., errno = 2, ..."); the outer ones only repeat the call chain.
herr_t take_innermost(unsigned n, const H5E_error2_t* err, void* data) {
    if (n == 0 && err && err->desc) *static_cast<std::string*>(data) = err->desc;
    return 0;
}

std::string hdf5_message() {
    std::string msg;
    H5Ewalk2(H5E_DEFAULT, H5E_WALK_UPWARD, take_innermost, &msg);
    // A failed write says "file write failed: time = ..., filename = ..., errno = 28, error message =
    // 'No space left on device', buf = 0x..., ...": the system's own words are what a user needs.
    const std::string key = "error message = '";
    const std::size_t at = msg.find(key);
    if (at != std::string::npos) {
        const std::size_t from = at + key.size(), to = msg.find('\'', from);
        if (to != std::string::npos) return msg.substr(from, to - from);
    }
    return msg;
}

[[noreturn]] void fail(const Place& where, const std::string& what) {
    std::string msg = where.describe() + ": " + what;
    const std::string detail = hdf5_message();
    if (!detail.empty()) msg += ": " + detail;
    throw Error(msg);
}

// A property list of the given class, or throw.
Handle property_list(hid_t cls, const Place& where) {
    return Handle(check(H5Pcreate(cls), where, "cannot create property list"), H5Pclose);
}

// Fixed-length UTF-8 string type of `size` bytes.
Handle string_type(std::size_t size, H5T_str_t pad, const Place& where) {
    Handle t(check(H5Tcopy(H5T_C_S1), where, "cannot create string type"), H5Tclose);
    check_status(H5Tset_size(t.id(), std::max<std::size_t>(size, 1)), where, "cannot size string type");
    check_status(H5Tset_strpad(t.id(), pad), where, "cannot set string padding");
    check_status(H5Tset_cset(t.id(), H5T_CSET_UTF8), where, "cannot set string character set");
    return t;
}

std::size_t kind_size(FieldKind kind) {
    switch (kind) {
        case FieldKind::u8: return 1;
        case FieldKind::u32: return 4;
        case FieldKind::u64: return 8;
        case FieldKind::f64: return 8;
        case FieldKind::text: return 0;
    }
    return 0;
}

hid_t numeric_type(FieldKind kind, bool native) {
    switch (kind) {
        case FieldKind::u8: return native ? H5T_NATIVE_UINT8 : H5T_STD_U8LE;
        case FieldKind::u32: return native ? H5T_NATIVE_UINT32 : H5T_STD_U32LE;
        case FieldKind::u64: return native ? H5T_NATIVE_UINT64 : H5T_STD_U64LE;
        case FieldKind::f64: return native ? H5T_NATIVE_DOUBLE : H5T_IEEE_F64LE;
        case FieldKind::text: break;
    }
    return H5I_INVALID_HID;
}

constexpr std::size_t kTargetChunkRecords = 16 * 1024;
constexpr std::size_t kMaxChunkBytes = 1024 * 1024;  // HDF5's default chunk cache size
constexpr unsigned kDeflateLevel = 4;

}  // namespace

// ---------------------------------------------------------------------------------------------

QuietErrors::QuietErrors() {
    if (H5Eget_auto2(H5E_DEFAULT, &saved_func_, &saved_data_) >= 0) {
        saved_ = true;
        H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
    }
}

QuietErrors::~QuietErrors() {
    if (saved_) H5Eset_auto2(H5E_DEFAULT, saved_func_, saved_data_);
}

Handle::Handle(Handle&& other) noexcept
    : id_(std::exchange(other.id_, H5I_INVALID_HID)), closer_(std::exchange(other.closer_, nullptr)) {}

Handle& Handle::operator=(Handle&& other) noexcept {
    if (this != &other) {
        close();
        id_ = std::exchange(other.id_, H5I_INVALID_HID);
        closer_ = std::exchange(other.closer_, nullptr);
    }
    return *this;
}

Handle::~Handle() { close(); }

bool Handle::close() {
    if (id_ < 0 || !closer_) return true;
    const bool ok = closer_(id_) >= 0;
    id_ = H5I_INVALID_HID;
    // A dataset that cannot write its last chunks on closing fails here, often in a destructor
    // that cannot throw: counted, so that the file is not then taken as complete (File::close).
    if (!ok) {
        g_close_failure = hdf5_message();
        ++g_failed_closes;
    }
    return ok;
}

void Handle::abandon() noexcept {
    id_ = H5I_INVALID_HID;
    closer_ = nullptr;
}

hid_t check(hid_t id, const Place& where, const std::string& what) {
    if (id < 0) fail(where, what);
    return id;
}

herr_t check_status(herr_t status, const Place& where, const std::string& what) {
    if (status < 0) fail(where, what);
    return status;
}

// ---------------------------------------------------------------------------------------------

RecordLayout& RecordLayout::add(const std::string& name, FieldKind kind) {
    if (kind == FieldKind::text) return add_text(name, 1);
    fields_.push_back({name, kind, 0, size_});
    size_ += kind_size(kind);
    return *this;
}

RecordLayout& RecordLayout::add_text(const std::string& name, std::size_t size) {
    size = std::max<std::size_t>(size, 1);
    fields_.push_back({name, FieldKind::text, size, size_});
    size_ += size;
    return *this;
}

Handle RecordLayout::make_type(bool native, const Place& where) const {
    Handle t(check(H5Tcreate(H5T_COMPOUND, std::max<std::size_t>(size_, 1)), where, "cannot create record type"),
             H5Tclose);
    for (const Field& f : fields_) {
        if (f.kind == FieldKind::text) {
            const Handle s = string_type(f.text_size, H5T_STR_NULLPAD, where);
            check_status(H5Tinsert(t.id(), f.name.c_str(), f.offset, s.id()), where,
                         "cannot add field '" + f.name + "' to record type");
        } else {
            check_status(H5Tinsert(t.id(), f.name.c_str(), f.offset, numeric_type(f.kind, native)), where,
                         "cannot add field '" + f.name + "' to record type");
        }
    }
    return t;
}

Handle RecordLayout::file_type(const Place& where) const { return make_type(false, where); }
Handle RecordLayout::memory_type(const Place& where) const { return make_type(true, where); }

// ---------------------------------------------------------------------------------------------

File::File(const std::string& actual_path, const std::string& display_name) : name_(display_name) {
    const Place where{name_, ""};
    // No creation/modification times on the root group: the same run gives the same bytes.
    const Handle fcpl = property_list(H5P_FILE_CREATE, where);
    check_status(H5Pset_obj_track_times(fcpl.id(), false), where, "cannot turn off time tracking");
    const Handle fapl = property_list(H5P_FILE_ACCESS, where);
    check_status(H5Pset_libver_bounds(fapl.id(), H5F_LIBVER_V110, H5F_LIBVER_V110), where,
                 "cannot set file format bounds");
    // Semi: closing fails while objects are open, instead of deferring the final flush until they
    // close (by then the file may already have been renamed as complete).
    check_status(H5Pset_fclose_degree(fapl.id(), H5F_CLOSE_SEMI), where, "cannot set file close degree");
    // Exclusive: fails on any existing name, a link included, instead of truncating or following it.
    handle_ = Handle(check(H5Fcreate(actual_path.c_str(), H5F_ACC_EXCL, fcpl.id(), fapl.id()), where,
                           "cannot create HDF5 file"),
                     H5Fclose);
    failed_closes_at_open_ = g_failed_closes.load();
}

Group File::root() const {
    const Place where{name_, "/"};
    return Group(Handle(check(H5Gopen2(handle_.id(), "/", H5P_DEFAULT), where, "cannot open root group"),
                        H5Gclose),
                 where);
}

void File::close() {
    const Place where{name_, ""};
    if (g_failed_closes.load() != failed_closes_at_open_) {
        g_file_abandoned = true;
        handle_.abandon();
        throw Error(name_ + ": cannot write: a group or dataset could not be written out" +
                    (g_close_failure.empty() ? std::string() : ": " + g_close_failure));
    }
    // Flushed first, and checked: a flush that fails (a full disk) leaves the file open in the
    // library, untouched by any later close (see shut_down_library).
    if (H5Fflush(handle_.id(), H5F_SCOPE_LOCAL) < 0) {
        g_file_abandoned = true;
        handle_.abandon();
        fail(where, "cannot write");
    }
    if (!handle_.close()) fail(where, "cannot close HDF5 file");
}

Group Group::create_group(const std::string& name) const {
    const Place where{place_.file, (place_.object == "/" ? "/" : place_.object + "/") + name};
    const Handle gcpl = property_list(H5P_GROUP_CREATE, where);
    check_status(H5Pset_obj_track_times(gcpl.id(), false), where, "cannot turn off time tracking");
    return Group(Handle(check(H5Gcreate2(handle_.id(), name.c_str(), H5P_DEFAULT, gcpl.id(), H5P_DEFAULT), where,
                              "cannot create group"),
                        H5Gclose),
                 where);
}

Attributes Group::attributes() const { return Attributes(handle_.id(), place_); }

// ---------------------------------------------------------------------------------------------

void Attributes::set(const std::string& name, hid_t file_type, hid_t memory_type, const void* value) const {
    const std::string what = "attribute '" + name + "'";
    const Handle space(check(H5Screate(H5S_SCALAR), place_, "cannot create dataspace for " + what), H5Sclose);
    const Handle attr(check(H5Acreate2(owner_, name.c_str(), file_type, space.id(), H5P_DEFAULT, H5P_DEFAULT),
                            place_, "cannot create " + what),
                      H5Aclose);
    check_status(H5Awrite(attr.id(), memory_type, value), place_, "cannot write " + what);
}

void Attributes::set_text(const std::string& name, const std::string& value) const {
    // Null-terminated, so C readers get a ready C string; the terminator is stored with it.
    const Handle t = string_type(value.size() + 1, H5T_STR_NULLTERM, place_);
    set(name, t.id(), t.id(), value.c_str());
}

void Attributes::set_i32(const std::string& name, std::int32_t value) const {
    set(name, H5T_STD_I32LE, H5T_NATIVE_INT32, &value);
}

void Attributes::set_u8(const std::string& name, std::uint8_t value) const {
    set(name, H5T_STD_U8LE, H5T_NATIVE_UINT8, &value);
}

void Attributes::set_u32(const std::string& name, std::uint32_t value) const {
    set(name, H5T_STD_U32LE, H5T_NATIVE_UINT32, &value);
}

void Attributes::set_u64(const std::string& name, std::uint64_t value) const {
    set(name, H5T_STD_U64LE, H5T_NATIVE_UINT64, &value);
}

void Attributes::set_f64(const std::string& name, double value) const {
    set(name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, &value);
}

void Attributes::set_f64_array(const std::string& name, const std::vector<double>& values) const {
    const std::string what = "attribute '" + name + "'";
    const hsize_t dims[1] = {values.size()};
    const Handle space(check(H5Screate_simple(1, dims, nullptr), place_, "cannot create dataspace for " + what),
                       H5Sclose);
    const Handle attr(check(H5Acreate2(owner_, name.c_str(), H5T_IEEE_F64LE, space.id(), H5P_DEFAULT, H5P_DEFAULT),
                            place_, "cannot create " + what),
                      H5Aclose);
    if (!values.empty())
        check_status(H5Awrite(attr.id(), H5T_NATIVE_DOUBLE, values.data()), place_, "cannot write " + what);
}

// ---------------------------------------------------------------------------------------------

OutputFile::OutputFile(const std::string& path) : path_(path) {
    temporary_.emplace(path_, [this](const std::string& name) {
        file_.emplace(name, path_);  // exclusive: TemporaryFile has just seen the name free
        return true;
    });
}

OutputFile::~OutputFile() {
    if (!committed_) discard();
}

Group OutputFile::root() const {
    if (!file_) throw Error(path_ + ": file already closed");
    return file_->root();
}

void OutputFile::commit() {
    if (!file_) throw Error(path_ + ": file already closed");
    try {
        file_->close();
    } catch (...) {
        discard();
        throw;
    }
    file_.reset();
    temporary_->commit();  // removes the temporary file itself if the rename fails
    committed_ = true;
}

void OutputFile::discard() noexcept {
    file_.reset();  // closes the handle if still open (the file may stay open if objects leaked)
    if (temporary_) temporary_->discard();
}

// ---------------------------------------------------------------------------------------------

std::size_t RecordTable::chunk_records_for(std::size_t record_size) {
    return std::clamp<std::size_t>(kMaxChunkBytes / std::max<std::size_t>(record_size, 1), 1, kTargetChunkRecords);
}

RecordTable::RecordTable(const Group& parent, const std::string& name, RecordLayout layout)
    : layout_(std::move(layout)),
      place_{parent.place().file, (parent.place().object == "/" ? "/" : parent.place().object + "/") + name},
      chunk_(chunk_records_for(layout_.record_size())) {
    const Handle file_type = layout_.file_type(place_);
    memory_type_ = layout_.memory_type(place_);

    const hsize_t dims[1] = {0};
    const hsize_t max_dims[1] = {H5S_UNLIMITED};
    const Handle space(check(H5Screate_simple(1, dims, max_dims), place_, "cannot create dataspace"), H5Sclose);

    const Handle dcpl = property_list(H5P_DATASET_CREATE, place_);
    const hsize_t chunk_dims[1] = {chunk_};
    check_status(H5Pset_chunk(dcpl.id(), 1, chunk_dims), place_, "cannot set chunk size");
    // Shuffle groups the bytes of each field position, which deflate then packs well.
    check_status(H5Pset_shuffle(dcpl.id()), place_, "cannot set shuffle filter");
    check_status(H5Pset_deflate(dcpl.id(), kDeflateLevel), place_, "cannot set deflate filter");
    check_status(H5Pset_obj_track_times(dcpl.id(), false), place_, "cannot turn off time tracking");

    handle_ = Handle(check(H5Dcreate2(parent.id(), name.c_str(), file_type.id(), space.id(), H5P_DEFAULT, dcpl.id(),
                                      H5P_DEFAULT),
                           place_, "cannot create dataset"),
                     H5Dclose);
    buffer_.assign(chunk_ * layout_.record_size(), std::byte{0});
}

RecordTable& RecordTable::begin() {
    if (buffered_ > 0 && field_ != layout_.fields().size())
        throw std::logic_error(place_.describe() + ": record started before the previous one was complete");
    if (buffered_ == chunk_) flush();
    std::memset(buffer_.data() + buffered_ * layout_.record_size(), 0, layout_.record_size());
    ++buffered_;
    field_ = 0;
    return *this;
}

std::byte* RecordTable::next_field(FieldKind kind) {
    const auto& fields = layout_.fields();
    if (buffered_ == 0 || field_ >= fields.size() || fields[field_].kind != kind)
        throw std::logic_error(place_.describe() + ": record fields given out of layout order");
    const Field& f = fields[field_++];
    return buffer_.data() + (buffered_ - 1) * layout_.record_size() + f.offset;
}

RecordTable& RecordTable::u8(std::uint8_t v) {
    std::memcpy(next_field(FieldKind::u8), &v, sizeof v);
    return *this;
}

RecordTable& RecordTable::u32(std::uint32_t v) {
    std::memcpy(next_field(FieldKind::u32), &v, sizeof v);
    return *this;
}

RecordTable& RecordTable::u64(std::uint64_t v) {
    std::memcpy(next_field(FieldKind::u64), &v, sizeof v);
    return *this;
}

RecordTable& RecordTable::f64(double v) {
    std::memcpy(next_field(FieldKind::f64), &v, sizeof v);
    return *this;
}

RecordTable& RecordTable::text(const std::string& v) {
    std::byte* dst = next_field(FieldKind::text);
    const Field& f = layout_.fields()[field_ - 1];
    if (v.size() > f.text_size)
        throw Error(place_.describe() + ": text for field '" + f.name + "' is longer than the field (" +
                    std::to_string(v.size()) + " > " + std::to_string(f.text_size) + " bytes)");
    std::memcpy(dst, v.data(), v.size());  // the rest stays zero (null padding)
    return *this;
}

void RecordTable::flush() {
    if (buffered_ == 0) return;
    if (field_ != layout_.fields().size())
        throw std::logic_error(place_.describe() + ": last record is incomplete");
    const hsize_t start[1] = {written_};
    const hsize_t count[1] = {buffered_};
    const hsize_t new_size[1] = {written_ + buffered_};
    check_status(H5Dset_extent(handle_.id(), new_size), place_, "cannot extend dataset");
    const Handle file_space(check(H5Dget_space(handle_.id()), place_, "cannot get dataspace"), H5Sclose);
    check_status(H5Sselect_hyperslab(file_space.id(), H5S_SELECT_SET, start, nullptr, count, nullptr), place_,
                 "cannot select records");
    const Handle memory_space(check(H5Screate_simple(1, count, nullptr), place_, "cannot create dataspace"),
                              H5Sclose);
    check_status(H5Dwrite(handle_.id(), memory_type_.id(), memory_space.id(), file_space.id(), H5P_DEFAULT,
                          buffer_.data()),
                 place_, "cannot write records");
    written_ += buffered_;
    buffered_ = 0;
    field_ = 0;
}

}  // namespace knockon::h5
