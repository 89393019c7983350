#include "tools/results/hdf5_read.hpp"

#include <algorithm>
#include <cstring>
#include <limits>
#include <filesystem>
#include <fstream>

namespace knockon::h5 {

namespace {

// The 8-byte signature at the start of every HDF5 file (HDF5 File Format Specification, "Format
// Signature"); files written by knockon have no user block before it.
constexpr unsigned char kSignature[8] = {0x89, 'H', 'D', 'F', '\r', '\n', 0x1a, '\n'};

std::string type_class_name(H5T_class_t c) {
    switch (c) {
        case H5T_INTEGER: return "integer";
        case H5T_FLOAT: return "float";
        case H5T_STRING: return "text";
        case H5T_COMPOUND: return "compound";
        default: return "another type";
    }
}

herr_t collect_name(hid_t, const char* name, const H5L_info_t*, void* data) {
    static_cast<std::vector<std::string>*>(data)->emplace_back(name);
    return 0;
}

}  // namespace

bool looks_like_hdf5(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    unsigned char head[8] = {};
    if (!in.read(reinterpret_cast<char*>(head), sizeof head)) return false;
    return std::memcmp(head, kSignature, sizeof head) == 0;
}

InputFile::InputFile(const std::string& path) : path_(path) {
    const Place where{path_, ""};
    std::error_code ec;
    if (!std::filesystem::exists(path_, ec)) throw Error(path_ + ": no such file");
    if (std::filesystem::is_directory(path_, ec)) throw Error(path_ + ": is a directory, not a results file");
    if (!looks_like_hdf5(path_)) throw Error(path_ + ": not an HDF5 file");
    file_ = Handle(check(H5Fopen(path_.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), where, "cannot open HDF5 file"),
                   H5Fclose);
    hsize_t size = 0;
    check_status(H5Fget_filesize(file_.id(), &size), where, "cannot read the file size");
    file_size_ = static_cast<double>(size);
}

void InputFile::check_attribute_size(const std::string& object, const std::string& name, double bytes) const {
    if (bytes > file_size_)
        throw Error(Place{path_, object}.describe() + ": attribute '" + name + "' declares " +
                    std::to_string(static_cast<unsigned long long>(bytes)) + " bytes, more than the whole file (" +
                    std::to_string(static_cast<unsigned long long>(file_size_)) + " bytes)");
}

bool InputFile::exists(const std::string& object) const {
    if (object == "/") return true;
    // H5Lexists wants every parent to exist: walk the path one link at a time.
    std::string prefix;
    std::size_t start = 1;
    while (start <= object.size()) {
        const std::size_t slash = std::min(object.find('/', start), object.size());
        prefix = object.substr(0, slash);
        if (H5Lexists(file_.id(), prefix.c_str(), H5P_DEFAULT) <= 0) return false;
        if (H5Oexists_by_name(file_.id(), prefix.c_str(), H5P_DEFAULT) <= 0) return false;
        start = slash + 1;
    }
    return true;
}

Handle InputFile::open_object(const std::string& object) const {
    const Place where{path_, object};
    if (!exists(object)) throw Error(where.describe() + ": missing");
    return Handle(check(H5Oopen(file_.id(), object.c_str(), H5P_DEFAULT), where, "cannot open"), H5Oclose);
}

hid_t InputFile::open_dataset(const std::string& dataset) const {
    // The last table stays open: its columns are read one after the other, and an open dataset
    // keeps its last chunk decompressed in the library's chunk cache (a chunk stays within it).
    if (dataset == open_path_ && open_.id() >= 0) return open_.id();
    const Place where{path_, dataset};
    if (!exists(dataset)) throw Error(where.describe() + ": missing table");
    open_ = Handle(check(H5Dopen2(file_.id(), dataset.c_str(), H5P_DEFAULT), where, "not a table"), H5Dclose);
    open_path_ = dataset;
    return open_.id();
}

Handle InputFile::open_attribute(const std::string& object, const std::string& name) const {
    const Handle owner = open_object(object);
    const Place where{path_, object};
    if (H5Aexists(owner.id(), name.c_str()) <= 0)
        throw Error(where.describe() + ": missing attribute '" + name + "'");
    return Handle(check(H5Aopen(owner.id(), name.c_str(), H5P_DEFAULT), where, "cannot open attribute '" + name + "'"),
                  H5Aclose);
}

std::vector<std::string> InputFile::members(const std::string& group) const {
    const Place where{path_, group};
    if (!exists(group)) throw Error(where.describe() + ": missing group");
    const Handle g(check(H5Gopen2(file_.id(), group.c_str(), H5P_DEFAULT), where, "not a group"), H5Gclose);
    std::vector<std::string> names;
    check_status(H5Literate(g.id(), H5_INDEX_NAME, H5_ITER_INC, nullptr, collect_name, &names), where,
                 "cannot list the group");
    return names;
}

bool InputFile::has_attribute(const std::string& object, const std::string& name) const {
    if (!exists(object)) return false;
    const Handle owner = open_object(object);
    return H5Aexists(owner.id(), name.c_str()) > 0;
}

std::string InputFile::text_attribute(const std::string& object, const std::string& name) const {
    const Place where{path_, object};
    const std::string what = "attribute '" + name + "'";
    const Handle a = open_attribute(object, name);
    const Handle type(check(H5Aget_type(a.id()), where, "cannot read the type of " + what), H5Tclose);
    if (H5Tget_class(type.id()) != H5T_STRING)
        throw Error(where.describe() + ": " + what + " should be text, is " + type_class_name(H5Tget_class(type.id())));
    if (H5Tis_variable_str(type.id()) > 0) {
        // Variable-length text (as other tools may write it): the library allocates the string.
        const Handle mem(check(H5Tcopy(H5T_C_S1), where, "cannot make a string type"), H5Tclose);
        check_status(H5Tset_size(mem.id(), H5T_VARIABLE), where, "cannot size a string type");
        // The stored character set (h5py writes UTF-8): the library converts between none.
        check_status(H5Tset_cset(mem.id(), H5Tget_cset(type.id())), where, "cannot set a character set");
        char* value = nullptr;
        check_status(H5Aread(a.id(), mem.id(), &value), where, "cannot read " + what);
        std::string out = value ? value : "";
        H5free_memory(value);
        return out;
    }
    const std::size_t size = H5Tget_size(type.id());
    check_attribute_size(object, name, static_cast<double>(size));
    std::vector<char> buf(size + 1, '\0');
    check_status(H5Aread(a.id(), type.id(), buf.data()), where, "cannot read " + what);
    return std::string(buf.data(), strnlen(buf.data(), size));
}

double InputFile::number_attribute(const std::string& object, const std::string& name) const {
    const std::vector<double> v = number_array_attribute(object, name);
    if (v.size() != 1)
        throw Error(Place{path_, object}.describe() + ": attribute '" + name + "' should be one number, holds " +
                    std::to_string(v.size()));
    return v.front();
}

std::vector<double> InputFile::number_array_attribute(const std::string& object, const std::string& name) const {
    const Place where{path_, object};
    const std::string what = "attribute '" + name + "'";
    const Handle a = open_attribute(object, name);
    const Handle type(check(H5Aget_type(a.id()), where, "cannot read the type of " + what), H5Tclose);
    const H5T_class_t c = H5Tget_class(type.id());
    if (c != H5T_INTEGER && c != H5T_FLOAT)
        throw Error(where.describe() + ": " + what + " should be a number, is " + type_class_name(c));
    const Handle space(check(H5Aget_space(a.id()), where, "cannot read the shape of " + what), H5Sclose);
    const hssize_t n = H5Sget_simple_extent_npoints(space.id());
    if (n < 0) throw Error(where.describe() + ": cannot read the shape of " + what);
    check_attribute_size(object, name, static_cast<double>(n) * static_cast<double>(H5Tget_size(type.id())));
    std::vector<double> out(static_cast<std::size_t>(n));
    if (n > 0) check_status(H5Aread(a.id(), H5T_NATIVE_DOUBLE, out.data()), where, "cannot read " + what);
    return out;
}

std::uint64_t InputFile::whole_attribute(const std::string& object, const std::string& name) const {
    const Place where{path_, object};
    const std::string what = "attribute '" + name + "'";
    const Handle a = open_attribute(object, name);
    const Handle type(check(H5Aget_type(a.id()), where, "cannot read the type of " + what), H5Tclose);
    const H5T_class_t c = H5Tget_class(type.id());
    if (c != H5T_INTEGER)
        throw Error(where.describe() + ": " + what + " should be a whole number, is " + type_class_name(c));
    const Handle space(check(H5Aget_space(a.id()), where, "cannot read the shape of " + what), H5Sclose);
    if (H5Sget_simple_extent_npoints(space.id()) != 1)
        throw Error(where.describe() + ": " + what + " should be one number");
    // Read in the stored signedness, so that no value is clipped or wrapped on the way.
    if (H5Tget_sign(type.id()) == H5T_SGN_NONE) {
        std::uint64_t v = 0;
        check_status(H5Aread(a.id(), H5T_NATIVE_UINT64, &v), where, "cannot read " + what);
        return v;
    }
    std::int64_t v = 0;
    check_status(H5Aread(a.id(), H5T_NATIVE_INT64, &v), where, "cannot read " + what);
    if (v < 0) throw Error(where.describe() + ": " + what + " is " + std::to_string(v) + ", should not be negative");
    return static_cast<std::uint64_t>(v);
}

std::vector<std::string> InputFile::fields(const std::string& dataset) const {
    const Place where{path_, dataset};
    const hid_t d = open_dataset(dataset);
    const Handle type(check(H5Dget_type(d), where, "cannot read the record type"), H5Tclose);
    if (H5Tget_class(type.id()) != H5T_COMPOUND) throw Error(where.describe() + ": not a table of records");
    const int n = H5Tget_nmembers(type.id());
    std::vector<std::string> out;
    for (int i = 0; i < n; ++i) {
        char* name = H5Tget_member_name(type.id(), static_cast<unsigned>(i));
        if (name) out.emplace_back(name);
        H5free_memory(name);
    }
    return out;
}

std::size_t InputFile::rows(const std::string& dataset) const {
    const Place where{path_, dataset};
    const hid_t d = open_dataset(dataset);
    const Handle space(check(H5Dget_space(d), where, "cannot read the shape"), H5Sclose);
    if (H5Sget_simple_extent_ndims(space.id()) != 1) throw Error(where.describe() + ": not a 1-D table");
    hsize_t dims[1] = {0};
    check(H5Sget_simple_extent_dims(space.id(), dims, nullptr), where, "cannot read the shape");
    const std::uint64_t n = dims[0];
    if (n == 0) return 0;
    // Declared records against the bytes stored: a damaged file may declare 10^8 records in a few
    // kilobytes, and each column read would allocate for all of them.
    const Handle type(check(H5Dget_type(d), where, "cannot read the record type"), H5Tclose);
    const double record = static_cast<double>(H5Tget_size(type.id()));
    const double stored = static_cast<double>(H5Dget_storage_size(d));
    const double declared = static_cast<double>(n) * record;
    if (stored > file_size_ || declared > kMaxDeflateRatio * stored)
        throw Error(where.describe() + ": declares " + std::to_string(n) + " records (" +
                    std::to_string(static_cast<unsigned long long>(declared)) + " bytes) but stores " +
                    std::to_string(static_cast<unsigned long long>(stored)) + " bytes in a file of " +
                    std::to_string(static_cast<unsigned long long>(file_size_)) +
                    " bytes; the file is damaged or was not written by knockon");
    // knockon writes every chunk of a table: one that is missing reads as made-up fill values.
    const Handle dcpl(check(H5Dget_create_plist(d), where, "cannot read the storage layout"), H5Pclose);
    if (H5Pget_layout(dcpl.id()) == H5D_CHUNKED) {
        hsize_t chunk[1] = {0};
        hsize_t chunks = 0;
        if (H5Pget_chunk(dcpl.id(), 1, chunk) != 1 || chunk[0] == 0 ||
            H5Dget_num_chunks(d, space.id(), &chunks) < 0 || chunks < (n + chunk[0] - 1) / chunk[0])
            throw Error(where.describe() + ": declares " + std::to_string(n) +
                        " records but does not store them all; the file is damaged or was not written by knockon");
    }
    if (n > std::numeric_limits<std::size_t>::max() / 8) throw Error(where.describe() + ": too many records");
    return static_cast<std::size_t>(n);
}

std::vector<double> InputFile::number_column(const std::string& dataset, const std::string& field) const {
    const Place where{path_, dataset};
    const hid_t d = open_dataset(dataset);
    const Handle type(check(H5Dget_type(d), where, "cannot read the record type"), H5Tclose);
    const int member = H5Tget_class(type.id()) == H5T_COMPOUND ? H5Tget_member_index(type.id(), field.c_str()) : -1;
    if (member < 0) throw Error(where.describe() + ": no field '" + field + "'");
    const H5T_class_t c = H5Tget_member_class(type.id(), static_cast<unsigned>(member));
    if (c != H5T_INTEGER && c != H5T_FLOAT)
        throw Error(where.describe() + ": field '" + field + "' should be a number, is " + type_class_name(c));
    const std::size_t n = rows(dataset);
    std::vector<double> out(n);
    if (n == 0) return out;
    // A record type of just this field: the library picks it out of each record and converts it.
    const Handle mem(check(H5Tcreate(H5T_COMPOUND, sizeof(double)), where, "cannot make a record type"), H5Tclose);
    check_status(H5Tinsert(mem.id(), field.c_str(), 0, H5T_NATIVE_DOUBLE), where, "cannot make a record type");
    check_status(H5Dread(d, mem.id(), H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()), where,
                 "cannot read field '" + field + "'");
    return out;
}

std::vector<std::string> InputFile::text_column(const std::string& dataset, const std::string& field) const {
    const Place where{path_, dataset};
    const hid_t d = open_dataset(dataset);
    const Handle type(check(H5Dget_type(d), where, "cannot read the record type"), H5Tclose);
    const int member = H5Tget_class(type.id()) == H5T_COMPOUND ? H5Tget_member_index(type.id(), field.c_str()) : -1;
    if (member < 0) throw Error(where.describe() + ": no field '" + field + "'");
    const Handle ftype(check(H5Tget_member_type(type.id(), static_cast<unsigned>(member)), where,
                             "cannot read the type of field '" + field + "'"),
                       H5Tclose);
    if (H5Tget_class(ftype.id()) != H5T_STRING || H5Tis_variable_str(ftype.id()) > 0)
        throw Error(where.describe() + ": field '" + field + "' should be fixed-length text");
    const std::size_t width = H5Tget_size(ftype.id());
    const std::size_t n = rows(dataset);
    std::vector<std::string> out;
    if (n == 0) return out;
    const Handle s(check(H5Tcopy(ftype.id()), where, "cannot make a string type"), H5Tclose);
    const Handle mem(check(H5Tcreate(H5T_COMPOUND, width), where, "cannot make a record type"), H5Tclose);
    check_status(H5Tinsert(mem.id(), field.c_str(), 0, s.id()), where, "cannot make a record type");
    std::vector<char> buf(n * width, '\0');
    check_status(H5Dread(d, mem.id(), H5S_ALL, H5S_ALL, H5P_DEFAULT, buf.data()), where,
                 "cannot read field '" + field + "'");
    out.reserve(n);
    for (std::size_t i = 0; i < n; ++i) {
        const char* p = buf.data() + i * width;
        out.emplace_back(p, strnlen(p, width));
    }
    return out;
}

}  // namespace knockon::h5
