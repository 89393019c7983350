#pragma once
// Shared by the tests of the HDF5 writers (test_sim_hdf5.cpp, test_study_hdf5.cpp, test_sim_cli.cpp): read-only
// access to a results file through the plain HDF5 C API, not through the writer's own wrappers
// (tools/results/hdf5_file) nor the program's reader (tools/results/hdf5_read), so that the layout of
// tools/results/HDF5_LAYOUT.md is checked from outside the code that writes it.
#include <catch2/catch.hpp>

#include <hdf5.h>

#include <cstddef>
#include <filesystem>
#include <string>
#include <vector>

namespace h5test {

namespace fs = std::filesystem;

struct Reader {
    hid_t file = H5I_INVALID_HID;
    explicit Reader(const fs::path& p) {
        file = H5Fopen(p.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
        REQUIRE(file >= 0);
    }
    ~Reader() { H5Fclose(file); }
    Reader(const Reader&) = delete;
    Reader& operator=(const Reader&) = delete;

    bool exists(const std::string& path) const { return H5Lexists(file, path.c_str(), H5P_DEFAULT) > 0; }

    // Records in a dataset; every record table is one-dimensional and extendible.
    hsize_t count(const std::string& dataset) const {
        hid_t d = H5Dopen2(file, dataset.c_str(), H5P_DEFAULT);
        REQUIRE(d >= 0);
        hid_t s = H5Dget_space(d);
        hsize_t dims[1] = {0}, max_dims[1] = {0};
        REQUIRE(H5Sget_simple_extent_ndims(s) == 1);
        H5Sget_simple_extent_dims(s, dims, max_dims);
        CHECK(max_dims[0] == H5S_UNLIMITED);  // extendible, so later work can append
        H5Sclose(s);
        H5Dclose(d);
        return dims[0];
    }

    // The names of a group's members, in name order.
    std::vector<std::string> members(const std::string& group) const {
        hid_t g = H5Gopen2(file, group.c_str(), H5P_DEFAULT);
        REQUIRE(g >= 0);
        H5G_info_t info{};
        REQUIRE(H5Gget_info(g, &info) >= 0);
        std::vector<std::string> out;
        for (hsize_t i = 0; i < info.nlinks; ++i) {
            char name[64] = {};
            H5Lget_name_by_idx(g, ".", H5_INDEX_NAME, H5_ITER_INC, i, name, sizeof name, H5P_DEFAULT);
            out.emplace_back(name);
        }
        H5Gclose(g);
        return out;
    }

    // One numeric field of every record, converted by HDF5 (fields are matched by name).
    template <class T>
    std::vector<T> column(const std::string& dataset, const std::string& field, hid_t native) const {
        hid_t d = H5Dopen2(file, dataset.c_str(), H5P_DEFAULT);
        REQUIRE(d >= 0);
        hid_t s = H5Dget_space(d);
        std::vector<T> out(static_cast<std::size_t>(H5Sget_simple_extent_npoints(s)));
        hid_t t = H5Tcreate(H5T_COMPOUND, sizeof(T));
        H5Tinsert(t, field.c_str(), 0, native);
        const herr_t read = H5Dread(d, t, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data());
        H5Tclose(t);
        H5Sclose(s);
        H5Dclose(d);
        INFO(dataset << " field " << field);
        REQUIRE(read >= 0);
        return out;
    }
    std::vector<double> f64(const std::string& dataset, const std::string& field) const {
        return column<double>(dataset, field, H5T_NATIVE_DOUBLE);
    }

    // One text field of every record: a fixed-length, null-padded string.
    std::vector<std::string> text_column(const std::string& dataset, const std::string& field) const {
        hid_t d = H5Dopen2(file, dataset.c_str(), H5P_DEFAULT);
        REQUIRE(d >= 0);
        hid_t ftype = H5Dget_type(d);
        const int member = H5Tget_member_index(ftype, field.c_str());
        REQUIRE(member >= 0);
        hid_t stype = H5Tget_member_type(ftype, static_cast<unsigned>(member));
        REQUIRE(H5Tget_class(stype) == H5T_STRING);
        REQUIRE(H5Tis_variable_str(stype) == 0);
        const std::size_t width = H5Tget_size(stype);
        hid_t s = H5Dget_space(d);
        const auto n = static_cast<std::size_t>(H5Sget_simple_extent_npoints(s));
        std::vector<char> raw(n * width + 1, '\0');
        hid_t t = H5Tcreate(H5T_COMPOUND, width);
        H5Tinsert(t, field.c_str(), 0, stype);
        REQUIRE(H5Dread(d, t, H5S_ALL, H5S_ALL, H5P_DEFAULT, raw.data()) >= 0);
        std::vector<std::string> out;
        for (std::size_t i = 0; i < n; ++i) {
            std::string v(raw.data() + i * width, width);
            v.erase(v.find_last_not_of('\0') + 1);  // null padding
            out.push_back(v);
        }
        H5Tclose(t);
        H5Sclose(s);
        H5Tclose(stype);
        H5Tclose(ftype);
        H5Dclose(d);
        return out;
    }

    // The fields of a record table, in order.
    std::vector<std::string> field_names(const std::string& dataset) const {
        hid_t d = H5Dopen2(file, dataset.c_str(), H5P_DEFAULT);
        REQUIRE(d >= 0);
        hid_t t = H5Dget_type(d);
        std::vector<std::string> out;
        for (int i = 0; i < H5Tget_nmembers(t); ++i) {
            char* n = H5Tget_member_name(t, static_cast<unsigned>(i));
            out.emplace_back(n);
            H5free_memory(n);
        }
        H5Tclose(t);
        H5Dclose(d);
        return out;
    }

    std::string text_attr(const std::string& object, const std::string& name) const {
        hid_t a = H5Aopen_by_name(file, object.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT);
        REQUIRE(a >= 0);
        hid_t t = H5Aget_type(a);
        REQUIRE(H5Tget_class(t) == H5T_STRING);
        std::vector<char> buf(H5Tget_size(t) + 1, '\0');
        REQUIRE(H5Aread(a, t, buf.data()) >= 0);
        H5Tclose(t);
        H5Aclose(a);
        return std::string(buf.data());
    }

    template <class T>
    T number_attr(const std::string& object, const std::string& name, hid_t native) const {
        hid_t a = H5Aopen_by_name(file, object.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT);
        REQUIRE(a >= 0);
        T v{};
        REQUIRE(H5Aread(a, native, &v) >= 0);
        H5Aclose(a);
        return v;
    }

    std::vector<double> f64_array_attr(const std::string& object, const std::string& name) const {
        hid_t a = H5Aopen_by_name(file, object.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT);
        REQUIRE(a >= 0);
        hid_t s = H5Aget_space(a);
        std::vector<double> v(static_cast<std::size_t>(H5Sget_simple_extent_npoints(s)));
        REQUIRE(H5Aread(a, H5T_NATIVE_DOUBLE, v.data()) >= 0);
        H5Sclose(s);
        H5Aclose(a);
        return v;
    }

    H5T_class_t attr_class(const std::string& object, const std::string& name) const {
        hid_t a = H5Aopen_by_name(file, object.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT);
        REQUIRE(a >= 0);
        hid_t t = H5Aget_type(a);
        const H5T_class_t c = H5Tget_class(t);
        H5Tclose(t);
        H5Aclose(a);
        return c;
    }
};

}  // namespace h5test
