// SPDX-License-Identifier: MIT
#pragma once
// Small RAII and checked-read helpers over the HDF5 C API. Every read checks type class,
// rank and dimensions against limits before allocating, and reports problems as text.
#include <hdf5.h>

#include <array>
#include <cstdint>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

namespace umbra::core::detail {

/// Owns an HDF5 identifier and closes it with the right function.
class Hid {
public:
    Hid() = default;
    explicit Hid(hid_t id) : id_(id) {}
    ~Hid() { reset(); }
    Hid(const Hid&) = delete;
    Hid& operator=(const Hid&) = delete;
    Hid(Hid&& o) noexcept : id_(o.id_) { o.id_ = -1; }
    Hid& operator=(Hid&& o) noexcept {
        if (this != &o) { reset(); id_ = o.id_; o.id_ = -1; }
        return *this;
    }
    void reset();
    hid_t get() const { return id_; }
    bool valid() const { return id_ >= 0; }
    explicit operator bool() const { return valid(); }

private:
    hid_t id_ = -1;
};

/// Debian's HDF5 is built without thread safety: every call into the library, from any file
/// type (captures, image files, ...), must hold this one mutex.
std::mutex& hdf5Mutex();

/// Turns off HDF5's automatic error printing (once per process).
void silenceHdf5();

bool exists(hid_t loc, const std::string& path);
bool attrExists(hid_t obj, const std::string& name);

// Attribute reads: nullopt with `err` set when present but unusable; nullopt with err empty
// when absent.
std::optional<std::string> readStringAttr(hid_t obj, const std::string& name, std::string& err);
std::optional<double> readDoubleAttr(hid_t obj, const std::string& name, std::string& err);
std::optional<int64_t> readIntAttr(hid_t obj, const std::string& name, std::string& err);
std::optional<std::vector<double>> readDoubleArrayAttr(hid_t obj, const std::string& name, size_t expected, std::string& err);

/// Dimensions of a dataset, or nullopt with err.
std::optional<std::vector<hsize_t>> datasetDims(hid_t ds, std::string& err);

/// Data that was never written reads back as fill values, slowly for a large claim (a damaged
/// file may declare 2^28 values of which nothing is stored). Returns a problem text naming
/// what is declared and what is stored when a contiguous dataset stores fewer bytes than its
/// shape needs or a chunked one stores fewer chunks; nullopt when the data is all there (or the
/// layout is one this check does not know). `what` names the data ("of traces").
std::optional<std::string> unwrittenData(hid_t ds, const std::vector<hsize_t>& dims, size_t element_bytes,
                                         const std::string& what);
/// A byte count as text in MiB ("12.5 MiB").
std::string mibText(double bytes);

/// Reads a whole numeric dataset of the given rank into doubles / int32 / float, after
/// checking its rank, its type class and that it holds at most `max_elems` values.
std::optional<std::vector<double>> readDoubles(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                               std::vector<hsize_t>& dims, std::string& err);
std::optional<std::vector<int32_t>> readInts(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                             std::vector<hsize_t>& dims, std::string& err);
std::optional<std::vector<float>> readFloats(hid_t loc, const std::string& name, int rank, size_t max_elems,
                                             std::vector<hsize_t>& dims, std::string& err);

// Writers (throw std::runtime_error on failure).
void writeStringAttr(hid_t obj, const std::string& name, const std::string& value);
void writeDoubleAttr(hid_t obj, const std::string& name, double value);
void writeIntAttr(hid_t obj, const std::string& name, int64_t value);
void writeDoubleArrayAttr(hid_t obj, const std::string& name, const std::vector<double>& v);
void writeDoubles(hid_t loc, const std::string& name, const double* data, const std::vector<hsize_t>& dims);
void writeInts(hid_t loc, const std::string& name, const int32_t* data, const std::vector<hsize_t>& dims);
void writeFloats(hid_t loc, const std::string& name, const float* data, const std::vector<hsize_t>& dims);
/// Groups and datasets are created without object timestamps (see creationPlist), so files
/// with the same content have the same bytes.
Hid createGroup(hid_t loc, const std::string& name);
/// An object creation property list (H5P_DATASET_CREATE or H5P_GROUP_CREATE) that does not
/// record access/modification times in the object header.
Hid creationPlist(hid_t cls);

}  // namespace umbra::core::detail
