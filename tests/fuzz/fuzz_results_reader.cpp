// libFuzzer target of the results reader (tools/results/results_file, hdf5_read): the input is a list
// of edits applied to a results file knockon wrote, then read as `knockon report` reads it.
// Editing through the HDF5 library, rather than flipping bytes of the file, keeps the library's
// own checksummed structures intact, so the fuzzer spends its time on what the reader must judge:
// values, attributes, missing or resized tables.  ResultsFileError is the expected answer; a
// crash, a sanitizer report, a hang, a huge allocation, another exception, or an infinity in what
// was read (no layout stores one) is a finding.
//
// The base files are $KNOCKON_FUZZ_BASE/{day,study,comparison}.h5 (tools/ci_fuzz.sh makes them with
// the knockon program).  Input: byte 0 picks the base file; then edits of 12 bytes each:
//   op, object, field, row, value (8 bytes, little-endian double or integer)
// with op (mod 10): 0 numeric field, 1 text field, 2 numeric attribute, 3 text attribute,
// 4 attribute removed, 5 table removed, 6 table resized, 7 number array attribute (thresholds),
// 8 numeric attribute made text, 9 group added under /replications.
#include <hdf5.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <filesystem>
#include <string>
#include <vector>

#include "tools/results/hdf5_file.hpp"
#include "tools/results/results_file.hpp"

namespace {

namespace fs = std::filesystem;

[[noreturn]] void finding(const std::string& what) {
    std::fprintf(stderr, "fuzz_results_reader: %s\n", what.c_str());
    std::abort();
}

// The objects of one base file, found once: its tables and the owners of its attributes.
struct Base {
    std::string path;
    std::vector<std::string> tables;
    std::vector<std::pair<std::string, std::string>> numeric_attributes, text_attributes;
};

herr_t collect_attribute(hid_t owner, const char* name, const H5A_info_t*, void* data) {
    auto* out = static_cast<std::pair<Base*, std::string>*>(data);
    const hid_t a = H5Aopen(owner, name, H5P_DEFAULT);
    const hid_t t = H5Aget_type(a);
    const bool text = H5Tget_class(t) == H5T_STRING;
    (text ? out->first->text_attributes : out->first->numeric_attributes).emplace_back(out->second, name);
    H5Tclose(t);
    H5Aclose(a);
    return 0;
}

herr_t collect_object(hid_t root, const char* name, const H5O_info_t* info, void* data) {
    Base* base = static_cast<Base*>(data);
    const std::string path = std::string("/") + (std::strcmp(name, ".") == 0 ? "" : name);
    if (info->type == H5O_TYPE_DATASET) base->tables.push_back(path);
    const hid_t o = H5Oopen(root, name, H5P_DEFAULT);
    std::pair<Base*, std::string> ctx{base, path};
    H5Aiterate2(o, H5_INDEX_NAME, H5_ITER_INC, nullptr, collect_attribute, &ctx);
    H5Oclose(o);
    return 0;
}

std::vector<Base> load_bases() {
    // HDF5 callocs a whole chunk (up to 1 MiB) for every table it reads and hands blocks that large
    // back to the allocator, which under AddressSanitizer maps fresh pages each time: kept on the
    // library's free lists instead, the runs are several times faster.
    H5set_free_list_limits(-1, -1, -1, -1, -1, -1);
    const char* dir = std::getenv("KNOCKON_FUZZ_BASE");
    if (!dir) finding("set KNOCKON_FUZZ_BASE to the directory of day.h5, study.h5 and comparison.h5 (tools/ci_fuzz.sh)");
    std::vector<Base> out;
    for (const char* name : {"day.h5", "study.h5", "comparison.h5"}) {
        Base b;
        b.path = (fs::path(dir) / name).string();
        const hid_t f = H5Fopen(b.path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
        if (f < 0) finding("cannot open base file " + b.path);
        H5Ovisit2(f, H5_INDEX_NAME, H5_ITER_INC, collect_object, &b, H5O_INFO_BASIC);
        H5Fclose(f);
        out.push_back(std::move(b));
    }
    return out;
}

struct Edit {
    std::uint8_t op, object, field, row;
    std::uint8_t value[8];
    double number() const {
        double v;
        std::memcpy(&v, value, 8);
        return v;
    }
    std::uint64_t whole() const {
        std::uint64_t v;
        std::memcpy(&v, value, 8);
        return v;
    }
    std::string text() const { return std::string(reinterpret_cast<const char*>(value), strnlen(reinterpret_cast<const char*>(value), 8)); }
};

// One field of one record written through a record type of that field alone (HDF5 converts).
void write_field(hid_t file, const std::string& table, const Edit& e, bool text) {
    const hid_t d = H5Dopen2(file, table.c_str(), H5P_DEFAULT);
    if (d < 0) return;
    const hid_t type = H5Dget_type(d), space = H5Dget_space(d);
    hsize_t dims[1] = {0};
    if (H5Tget_class(type) == H5T_COMPOUND && H5Tget_nmembers(type) > 0 && H5Sget_simple_extent_ndims(space) == 1 &&
        H5Sget_simple_extent_dims(space, dims, nullptr) == 1 && dims[0] > 0 && dims[0] < (1u << 20)) {
        const unsigned member = e.field % static_cast<unsigned>(H5Tget_nmembers(type));
        char* name = H5Tget_member_name(type, member);
        const H5T_class_t c = H5Tget_member_class(type, member);
        const hsize_t start[1] = {e.row % dims[0]}, count[1] = {1};
        H5Sselect_hyperslab(space, H5S_SELECT_SET, start, nullptr, count, nullptr);
        const hid_t one = H5Screate_simple(1, count, nullptr);
        if (text && c == H5T_STRING) {
            const hid_t s = H5Tget_member_type(type, member);
            const std::size_t width = H5Tget_size(s);
            std::vector<char> buf(width, '\0');
            const std::string v = e.text();
            std::memcpy(buf.data(), v.data(), std::min(width, v.size()));
            const hid_t mem = H5Tcreate(H5T_COMPOUND, width);
            H5Tinsert(mem, name, 0, s);
            H5Dwrite(d, mem, one, space, H5P_DEFAULT, buf.data());
            H5Tclose(mem);
            H5Tclose(s);
        } else if (!text && (c == H5T_INTEGER || c == H5T_FLOAT)) {
            const hid_t mem = H5Tcreate(H5T_COMPOUND, 8);
            H5Tinsert(mem, name, 0, c == H5T_INTEGER ? H5T_NATIVE_UINT64 : H5T_NATIVE_DOUBLE);
            H5Dwrite(d, mem, one, space, H5P_DEFAULT, e.value);
            H5Tclose(mem);
        }
        H5Sclose(one);
        H5free_memory(name);
    }
    H5Sclose(space);
    H5Tclose(type);
    H5Dclose(d);
}

void write_attribute(hid_t file, const std::pair<std::string, std::string>& at, hid_t type, hid_t space,
                     const void* value) {
    const hid_t o = H5Oopen(file, at.first.c_str(), H5P_DEFAULT);
    if (o < 0) return;
    if (H5Aexists(o, at.second.c_str()) > 0) H5Adelete(o, at.second.c_str());
    const hid_t a = H5Acreate2(o, at.second.c_str(), type, space, H5P_DEFAULT, H5P_DEFAULT);
    if (a >= 0) {
        H5Awrite(a, type, value);
        H5Aclose(a);
    }
    H5Oclose(o);
}

void text_attribute(hid_t file, const std::pair<std::string, std::string>& at, const std::string& v) {
    const hid_t t = H5Tcopy(H5T_C_S1);
    H5Tset_size(t, v.size() + 1);
    const hid_t s = H5Screate(H5S_SCALAR);
    write_attribute(file, at, t, s, v.c_str());
    H5Sclose(s);
    H5Tclose(t);
}

void apply(hid_t file, const Base& b, const Edit& e) {
    auto pick = [](const auto& list, std::uint8_t k) { return list.empty() ? nullptr : &list[k % list.size()]; };
    std::vector<std::pair<std::string, std::string>> all = b.numeric_attributes;
    all.insert(all.end(), b.text_attributes.begin(), b.text_attributes.end());
    switch (e.op % 10) {
        case 0:
            if (const auto* t = pick(b.tables, e.object)) write_field(file, *t, e, false);
            break;
        case 1:
            if (const auto* t = pick(b.tables, e.object)) write_field(file, *t, e, true);
            break;
        case 2:
            if (const auto* at = pick(b.numeric_attributes, e.object)) {
                const hid_t s = H5Screate(H5S_SCALAR);
                // Integer or float, as the field byte says: both kinds are stored.
                if (e.field % 2) write_attribute(file, *at, H5T_NATIVE_UINT64, s, e.value);
                else write_attribute(file, *at, H5T_NATIVE_DOUBLE, s, e.value);
                H5Sclose(s);
            }
            break;
        case 3:
            if (const auto* at = pick(b.text_attributes, e.object)) text_attribute(file, *at, e.text());
            break;
        case 4:
            if (const auto* at = pick(all, e.object)) {
                const hid_t o = H5Oopen(file, at->first.c_str(), H5P_DEFAULT);
                if (o >= 0) {
                    H5Adelete(o, at->second.c_str());
                    H5Oclose(o);
                }
            }
            break;
        case 5:
            if (const auto* t = pick(b.tables, e.object)) H5Ldelete(file, t->c_str(), H5P_DEFAULT);
            break;
        case 6:
            if (const auto* t = pick(b.tables, e.object)) {
                const hid_t d = H5Dopen2(file, t->c_str(), H5P_DEFAULT);
                if (d >= 0) {
                    const hsize_t n[1] = {e.whole() % (std::uint64_t{1} << 40)};
                    H5Dset_extent(d, n);
                    H5Dclose(d);
                }
            }
            break;
        case 7:
            if (const auto* at = pick(b.numeric_attributes, e.object)) {
                const hsize_t n[1] = {static_cast<hsize_t>(e.field % 4)};
                const double v = e.number();
                const double values[3] = {v, v + static_cast<double>(e.row), v * 2.0};
                const hid_t s = H5Screate_simple(1, n, nullptr);
                write_attribute(file, *at, H5T_NATIVE_DOUBLE, s, values);
                H5Sclose(s);
            }
            break;
        case 8:
            if (const auto* at = pick(b.numeric_attributes, e.object)) text_attribute(file, *at, e.text());
            break;
        case 9: {
            char name[32];
            std::snprintf(name, sizeof name, "/replications/%06u", static_cast<unsigned>(e.whole() % 1000000));
            if (H5Lexists(file, "/replications", H5P_DEFAULT) > 0 && H5Lexists(file, name, H5P_DEFAULT) <= 0) {
                const hid_t g = H5Gcreate2(file, name, H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT);
                if (g >= 0) H5Gclose(g);
            }
            break;
        }
    }
}

// No layout stores an infinity: one read back means a check is missing.
void no_infinity(const knockon::ResultsFile& r) {
    auto check = [](double v, const char* what) {
        if (std::isinf(v)) finding(std::string("infinity read into ") + what);
    };
    auto day = [&](const knockon::SimResult& d) {
        for (const auto& t : d.timing)
            for (double v : {t.scheduled_arrival, t.scheduled_departure, t.arrival, t.departure, t.arrival_delay,
                             t.departure_delay, t.knock_on})
                check(v, "a timing record");
        for (const auto& s : d.sections)
            for (double v : {s.locked, s.head_enters, s.head_leaves, s.tail_clears, s.released}) check(v, "occupancy");
        for (const auto& h : d.holds) check(h.to - h.from, "a hold");
        for (const auto& s : d.samples) check(s.time + s.position + s.speed, "a trajectory sample");
    };
    auto study = [&](const knockon::StoredStudy& s) {
        for (const auto& p : s.per_day) check(p.total_primary + p.total_knock_on + p.mean_arrival_delay, "per_day");
        for (const auto& e : {s.summary.total_primary, s.summary.total_knock_on, s.summary.mean_arrival_delay})
            check(e.mean + e.half_width + e.lower + e.upper, "the summary");
        for (const auto& tp : s.summary.timing_points) check(tp.knock_on.mean + tp.knock_on.half_width, "timing points");
    };
    if (r.day) day(*r.day);
    if (r.study) study(*r.study);
    for (const auto& v : r.variants) {
        study(v.study);
        check(v.plan.mean_minimum_headway + v.plan.peak_consumption + v.plan.day_consumption, "plan figures");
    }
    for (const auto& d : r.differences) check(d.difference.mean, "a difference");
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    static const std::vector<Base> bases = load_bases();
    // The edited copy: one scratch file per process, removed when the run ends.
    static const struct Scratch {
        std::string path = "/tmp/knockon-fuzz-results-" + std::to_string(::getpid()) + ".h5";
        ~Scratch() { ::unlink(path.c_str()); }
    } scratch_file;
    const std::string& scratch = scratch_file.path;
    if (size == 0) return 0;
    const Base& base = bases[data[0] % bases.size()];
    fs::copy_file(base.path, scratch, fs::copy_options::overwrite_existing);
    {
        const knockon::h5::QuietErrors quiet;
        const hid_t file = H5Fopen(scratch.c_str(), H5F_ACC_RDWR, H5P_DEFAULT);
        if (file < 0) finding("cannot open the copy of " + base.path);
        for (std::size_t at = 1; at + sizeof(Edit) <= size; at += sizeof(Edit)) {
            Edit e;
            std::memcpy(&e, data + at, sizeof e);
            apply(file, base, e);
        }
        H5Fclose(file);
    }
    try {
        const knockon::ResultsFile r = knockon::read_results(scratch);
        no_infinity(r);
        for (std::uint32_t k : r.traced) {
            const knockon::SimResult d = knockon::read_traced_day(scratch, k);
            knockon::ResultsFile one;
            one.day = d;
            no_infinity(one);
        }
    } catch (const knockon::ResultsFileError&) {
    } catch (const std::exception& e) {
        finding(std::string("not a ResultsFileError: ") + e.what());
    }
    return 0;
}
