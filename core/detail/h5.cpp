// SPDX-License-Identifier: MIT
#include "core/detail/h5.h"

#include <cmath>
#include <cstdio>

#include <mutex>
#include <stdexcept>

namespace umbra::core::detail {

void Hid::reset() {
    if (id_ < 0) return;
    switch (H5Iget_type(id_)) {
        case H5I_FILE: H5Fclose(id_); break;
        case H5I_GROUP: H5Gclose(id_); break;
        case H5I_DATASET: H5Dclose(id_); break;
        case H5I_DATASPACE: H5Sclose(id_); break;
        case H5I_DATATYPE: H5Tclose(id_); break;
        case H5I_ATTR: H5Aclose(id_); break;
        case H5I_GENPROP_LST: H5Pclose(id_); break;
        default: break;
    }
    id_ = -1;
}

std::mutex& hdf5Mutex() {
    static std::mutex m;
    return m;
}

void silenceHdf5() {
    static std::once_flag once;
    std::call_once(once, [] { H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr); });
}

bool exists(hid_t loc, const std::string& path) {
    // Check each component so that a missing intermediate group is not an error.
    std::string part;
    size_t pos = 0;
    while (pos <= path.size()) {
        size_t next = path.find('/', pos);
        if (next == std::string::npos) next = path.size();
        part = path.substr(0, next);
        if (!part.empty() && part != "/") {
            if (H5Lexists(loc, part.c_str(), H5P_DEFAULT) <= 0) return false;
        }
        pos = next + 1;
    }
    return H5Oexists_by_name(loc, path.c_str(), H5P_DEFAULT) > 0;
}

bool attrExists(hid_t obj, const std::string& name) { return H5Aexists(obj, name.c_str()) > 0; }

std::optional<std::string> readStringAttr(hid_t obj, const std::string& name, std::string& err) {
    err.clear();
    if (!attrExists(obj, name)) return std::nullopt;
    Hid a(H5Aopen(obj, name.c_str(), H5P_DEFAULT));
    if (!a) { err = "cannot be opened"; return std::nullopt; }
    Hid t(H5Aget_type(a.get()));
    if (H5Tget_class(t.get()) != H5T_STRING) { err = "is not a string"; return std::nullopt; }
    Hid sp(H5Aget_space(a.get()));
    if (H5Sget_simple_extent_npoints(sp.get()) != 1) { err = "must be a single string"; return std::nullopt; }
    if (H5Tis_variable_str(t.get()) > 0) {
        Hid mt(H5Tcopy(H5T_C_S1));
        H5Tset_size(mt.get(), H5T_VARIABLE);
        H5Tset_cset(mt.get(), H5Tget_cset(t.get()));
        char* s = nullptr;
        if (H5Aread(a.get(), mt.get(), &s) < 0 || !s) { err = "cannot be read"; return std::nullopt; }
        std::string out(s);
        H5free_memory(s);
        return out;
    }
    size_t n = H5Tget_size(t.get());
    if (n == 0 || n > (1u << 20)) { err = "has an unreasonable length"; return std::nullopt; }
    std::string buf(n, '\0');
    Hid mt(H5Tcopy(t.get()));
    if (H5Aread(a.get(), mt.get(), buf.data()) < 0) { err = "cannot be read"; return std::nullopt; }
    auto z = buf.find('\0');
    if (z != std::string::npos) buf.resize(z);
    while (!buf.empty() && buf.back() == ' ') buf.pop_back();
    return buf;
}

namespace {
template <typename T>
std::optional<T> readScalarAttr(hid_t obj, const std::string& name, hid_t memtype, H5T_class_t want1,
                                H5T_class_t want2, std::string& err) {
    err.clear();
    if (!attrExists(obj, name)) return std::nullopt;
    Hid a(H5Aopen(obj, name.c_str(), H5P_DEFAULT));
    if (!a) { err = "cannot be opened"; return std::nullopt; }
    Hid t(H5Aget_type(a.get()));
    auto cls = H5Tget_class(t.get());
    if (cls != want1 && cls != want2) { err = "is not a number"; return std::nullopt; }
    Hid sp(H5Aget_space(a.get()));
    if (H5Sget_simple_extent_npoints(sp.get()) != 1) { err = "must be a single value"; return std::nullopt; }
    T v{};
    if (H5Aread(a.get(), memtype, &v) < 0) { err = "cannot be read"; return std::nullopt; }
    return v;
}
}  // namespace

std::optional<double> readDoubleAttr(hid_t obj, const std::string& name, std::string& err) {
    return readScalarAttr<double>(obj, name, H5T_NATIVE_DOUBLE, H5T_FLOAT, H5T_INTEGER, err);
}

std::optional<int64_t> readIntAttr(hid_t obj, const std::string& name, std::string& err) {
    return readScalarAttr<int64_t>(obj, name, H5T_NATIVE_INT64, H5T_INTEGER, H5T_INTEGER, err);
}

std::optional<std::vector<double>> readDoubleArrayAttr(hid_t obj, const std::string& name, size_t expected,
                                                       std::string& err) {
    err.clear();
    if (!attrExists(obj, name)) return std::nullopt;
    Hid a(H5Aopen(obj, name.c_str(), H5P_DEFAULT));
    Hid t(H5Aget_type(a.get()));
    auto cls = H5Tget_class(t.get());
    if (cls != H5T_FLOAT && cls != H5T_INTEGER) { err = "is not numeric"; return std::nullopt; }
    Hid sp(H5Aget_space(a.get()));
    if (size_t(H5Sget_simple_extent_npoints(sp.get())) != expected) {
        err = "must hold " + std::to_string(expected) + " values";
        return std::nullopt;
    }
    std::vector<double> v(expected);
    if (H5Aread(a.get(), H5T_NATIVE_DOUBLE, v.data()) < 0) { err = "cannot be read"; return std::nullopt; }
    return v;
}

std::optional<std::vector<hsize_t>> datasetDims(hid_t ds, std::string& err) {
    Hid sp(H5Dget_space(ds));
    if (!sp) { err = "has no dataspace"; return std::nullopt; }
    int rank = H5Sget_simple_extent_ndims(sp.get());
    if (rank < 0 || rank > 8) { err = "has an unreadable shape"; return std::nullopt; }
    std::vector<hsize_t> d(static_cast<size_t>(rank));
    if (rank > 0) H5Sget_simple_extent_dims(sp.get(), d.data(), nullptr);
    return d;
}

namespace {
std::string shapeText(const std::vector<hsize_t>& d) {
    std::string s = "[";
    for (size_t i = 0; i < d.size(); ++i) s += (i ? ", " : "") + std::to_string(d[i]);
    return s + "]";
}

template <typename T>
std::optional<std::vector<T>> readNumeric(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                          std::vector<hsize_t>& dims, std::string& err, hid_t memtype,
                                          bool want_integer) {
    err.clear();
    if (!exists(loc, name)) { err = "is missing"; return std::nullopt; }
    Hid ds(H5Dopen2(loc, name.c_str(), H5P_DEFAULT));
    if (!ds) { err = "is not a dataset"; return std::nullopt; }
    Hid t(H5Dget_type(ds.get()));
    auto cls = H5Tget_class(t.get());
    if (want_integer ? cls != H5T_INTEGER : (cls != H5T_FLOAT && cls != H5T_INTEGER)) {
        err = want_integer ? "must hold integers" : "must hold numbers";
        return std::nullopt;
    }
    auto d = datasetDims(ds.get(), err);
    if (!d) return std::nullopt;
    dims = *d;
    if (int(dims.size()) != rank) {
        err = "has rank " + std::to_string(dims.size()) + " " + shapeText(dims) + "; expected rank " + std::to_string(rank);
        return std::nullopt;
    }
    // Product of the dimensions, checked against the limit before it can overflow.
    size_t total = 1;
    bool over = false;
    for (auto x : dims) {
        if (x != 0 && total > max_elems / x) { over = true; break; }
        total *= x;
    }
    if (over || total > max_elems) {
        err = "shape " + shapeText(dims) + " is too large (limit " + std::to_string(max_elems) + " values)";
        return std::nullopt;
    }
    const size_t n = total;
    std::vector<T> v(n);
    if (n > 0 && H5Dread(ds.get(), memtype, H5S_ALL, H5S_ALL, H5P_DEFAULT, v.data()) < 0) {
        err = "cannot be read (file damaged or truncated?)";
        return std::nullopt;
    }
    return v;
}
}  // namespace

std::optional<std::vector<double>> readDoubles(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                               std::vector<hsize_t>& dims, std::string& err) {
    return readNumeric<double>(loc, name, rank, max_elems, dims, err, H5T_NATIVE_DOUBLE, false);
}
std::optional<std::vector<int32_t>> readInts(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                             std::vector<hsize_t>& dims, std::string& err) {
    return readNumeric<int32_t>(loc, name, rank, max_elems, dims, err, H5T_NATIVE_INT32, true);
}
std::optional<std::vector<float>> readFloats(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                             std::vector<hsize_t>& dims, std::string& err) {
    return readNumeric<float>(loc, name, rank, max_elems, dims, err, H5T_NATIVE_FLOAT, false);
}

namespace {
void check(herr_t r, const std::string& what) {
    if (r < 0) throw std::runtime_error("HDF5 write failed: " + what);
}
Hid checkId(hid_t id, const std::string& what) {
    if (id < 0) throw std::runtime_error("HDF5 write failed: " + what);
    return Hid(id);
}
void writeScalarAttr(hid_t obj, const std::string& name, hid_t filetype, hid_t memtype, const void* v) {
    if (attrExists(obj, name)) H5Adelete(obj, name.c_str());
    Hid sp = checkId(H5Screate(H5S_SCALAR), name);
    Hid a = checkId(H5Acreate2(obj, name.c_str(), filetype, sp.get(), H5P_DEFAULT, H5P_DEFAULT), name);
    check(H5Awrite(a.get(), memtype, v), name);
}
void writeDataset(hid_t loc, const std::string& name, hid_t filetype, hid_t memtype, const void* data,
                  const std::vector<hsize_t>& dims) {
    Hid sp = checkId(H5Screate_simple(int(dims.size()), dims.data(), nullptr), name);
    Hid dcpl = creationPlist(H5P_DATASET_CREATE);
    Hid ds = checkId(H5Dcreate2(loc, name.c_str(), filetype, sp.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT), name);
    size_t n = 1;
    for (auto d : dims) n *= d;
    if (n) check(H5Dwrite(ds.get(), memtype, H5S_ALL, H5S_ALL, H5P_DEFAULT, data), name);
}
}  // namespace

void writeStringAttr(hid_t obj, const std::string& name, const std::string& value) {
    Hid t = checkId(H5Tcopy(H5T_C_S1), name);
    H5Tset_size(t.get(), H5T_VARIABLE);
    H5Tset_cset(t.get(), H5T_CSET_UTF8);
    const char* s = value.c_str();
    writeScalarAttr(obj, name, t.get(), t.get(), &s);
}
void writeDoubleAttr(hid_t obj, const std::string& name, double value) {
    writeScalarAttr(obj, name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, &value);
}
void writeIntAttr(hid_t obj, const std::string& name, int64_t value) {
    writeScalarAttr(obj, name, H5T_STD_I64LE, H5T_NATIVE_INT64, &value);
}
void writeDoubleArrayAttr(hid_t obj, const std::string& name, const std::vector<double>& v) {
    if (attrExists(obj, name)) H5Adelete(obj, name.c_str());
    hsize_t n = v.size();
    Hid sp = checkId(H5Screate_simple(1, &n, nullptr), name);
    Hid a = checkId(H5Acreate2(obj, name.c_str(), H5T_IEEE_F64LE, sp.get(), H5P_DEFAULT, H5P_DEFAULT), name);
    check(H5Awrite(a.get(), H5T_NATIVE_DOUBLE, v.data()), name);
}
void writeDoubles(hid_t loc, const std::string& name, const double* data, const std::vector<hsize_t>& dims) {
    writeDataset(loc, name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, data, dims);
}
void writeInts(hid_t loc, const std::string& name, const int32_t* data, const std::vector<hsize_t>& dims) {
    writeDataset(loc, name, H5T_STD_I32LE, H5T_NATIVE_INT32, data, dims);
}
void writeFloats(hid_t loc, const std::string& name, const float* data, const std::vector<hsize_t>& dims) {
    writeDataset(loc, name, H5T_IEEE_F32LE, H5T_NATIVE_FLOAT, data, dims);
}
Hid createGroup(hid_t loc, const std::string& name) {
    Hid gcpl = creationPlist(H5P_GROUP_CREATE);
    return checkId(H5Gcreate2(loc, name.c_str(), H5P_DEFAULT, gcpl.get(), H5P_DEFAULT), name);
}
Hid creationPlist(hid_t cls) {
    Hid p = checkId(H5Pcreate(cls), "creation property list");
    check(H5Pset_obj_track_times(p.get(), false), "creation property list");
    return p;
}

std::string mibText(double bytes) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.1f MiB", bytes / (1024.0 * 1024.0));
    return buf;
}

std::optional<std::string> unwrittenData(hid_t ds, const std::vector<hsize_t>& dims, size_t element_bytes,
                                         const std::string& what) {
    double declared = double(element_bytes);
    for (hsize_t v : dims) declared *= double(v);
    if (!(declared > 0)) return std::nullopt;
    Hid dcpl(H5Dget_create_plist(ds));
    const H5D_layout_t layout = dcpl ? H5Pget_layout(dcpl.get()) : H5D_LAYOUT_ERROR;
    if (layout == H5D_CONTIGUOUS) {
        const double stored = double(H5Dget_storage_size(ds));
        if (stored < declared)
            return "declares " + mibText(declared) + " " + what + " but only " + mibText(stored) +
                   " are stored; the rest was never written (damaged or truncated file)";
    } else if (layout == H5D_CHUNKED) {
        const int rank = int(dims.size());
        std::vector<hsize_t> chunk(dims.size(), 0);
        hsize_t nchunks = 0;
        Hid space(H5Dget_space(ds));  // this HDF5 version refuses H5S_ALL here
        if (rank > 0 && H5Pget_chunk(dcpl.get(), rank, chunk.data()) == rank && space &&
            H5Dget_num_chunks(ds, space.get(), &nchunks) >= 0) {
            double expected = 1;
            for (int k = 0; k < rank; ++k) {
                if (chunk[k] == 0) return std::nullopt;
                expected *= std::ceil(double(dims[k]) / double(chunk[k]));
            }
            if (double(nchunks) < expected)
                return "declares " + mibText(declared) + " " + what + " in " + std::to_string(static_cast<long long>(expected)) +
                       " chunks but only " + std::to_string(nchunks) +
                       " chunks are stored; the rest was never written (damaged or truncated file)";
        }
    }
    return std::nullopt;
}

}  // namespace umbra::core::detail
