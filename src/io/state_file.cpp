#include "freshet/io/state_file.hpp"

#include <hdf5.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>
#include <memory>
#include <mutex>
#include <utility>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/core/sha256.hpp"
#include "freshet/io/atomic_file.hpp"
#include "freshet/io/netcdf_writer.hpp"

namespace freshet::io {

namespace {

// Closes an HDF5 identifier with the matching call.
class Handle {
 public:
  Handle(hid_t id, herr_t (*close)(hid_t)) : id_(id), close_(close) {}
  ~Handle() {
    if (id_ >= 0) close_(id_);
  }
  Handle(const Handle&) = delete;
  Handle& operator=(const Handle&) = delete;
  [[nodiscard]] hid_t get() const noexcept { return id_; }
  [[nodiscard]] bool ok() const noexcept { return id_ >= 0; }

 private:
  hid_t id_;
  herr_t (*close_)(hid_t);
};

// HDF5 prints its error stack unless told not to; freshet reports its own messages.
void silence_hdf5() { H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr); }

[[noreturn]] void refuse(const std::filesystem::path& path, const std::string& field,
                         const std::string& message) {
  Problem p;
  p.file = path.string();
  p.element = "state file";
  p.field = field;
  p.message = message;
  throw InputError(std::move(p));
}

// ---- writing -----------------------------------------------------------------------------

class Writer {
 public:
  explicit Writer(std::filesystem::path partial, std::filesystem::path final_path)
      : partial_(std::move(partial)), final_(std::move(final_path)),
        file_(H5Fcreate(partial_.c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT), H5Fclose) {
    if (!file_.ok()) fail("cannot create the file");
  }

  void text_attribute(const char* name, const std::string& value) {
    Handle type(H5Tcopy(H5T_C_S1), H5Tclose);
    H5Tset_size(type.get(), std::max<std::size_t>(1, value.size()));
    H5Tset_strpad(type.get(), H5T_STR_NULLPAD);
    Handle space(H5Screate(H5S_SCALAR), H5Sclose);
    Handle attr(H5Acreate2(file_.get(), name, type.get(), space.get(), H5P_DEFAULT, H5P_DEFAULT),
                H5Aclose);
    const std::string padded = value.empty() ? std::string(1, '\0') : value;
    if (!attr.ok() || H5Awrite(attr.get(), type.get(), padded.data()) < 0) fail(name);
  }
  template <class T>
  void number_attribute(const char* name, T value, hid_t file_type, hid_t memory_type) {
    Handle space(H5Screate(H5S_SCALAR), H5Sclose);
    Handle attr(H5Acreate2(file_.get(), name, file_type, space.get(), H5P_DEFAULT, H5P_DEFAULT),
                H5Aclose);
    if (!attr.ok() || H5Awrite(attr.get(), memory_type, &value) < 0) fail(name);
  }

  void entry(const std::string& path, const StateArchive::Value& value) {
    const std::size_t slash = path.rfind('/');
    const hid_t group = slash == std::string::npos ? file_.get() : group_for(path.substr(0, slash));
    const std::string name = slash == std::string::npos ? path : path.substr(slash + 1);
    if (const auto* d = std::get_if<std::vector<double>>(&value)) {
      array(group, name, *d, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, path);
    } else if (const auto* i = std::get_if<std::vector<std::int64_t>>(&value)) {
      array(group, name, *i, H5T_STD_I64LE, H5T_NATIVE_INT64, path);
    } else {
      const std::string& s = std::get<std::string>(value);
      Handle type(H5Tcopy(H5T_C_S1), H5Tclose);
      H5Tset_size(type.get(), std::max<std::size_t>(1, s.size()));
      H5Tset_strpad(type.get(), H5T_STR_NULLPAD);
      Handle space(H5Screate(H5S_SCALAR), H5Sclose);
      Handle set(H5Dcreate2(group, name.c_str(), type.get(), space.get(), H5P_DEFAULT, H5P_DEFAULT,
                            H5P_DEFAULT),
                 H5Dclose);
      const std::string padded = s.empty() ? std::string(1, '\0') : s;
      if (!set.ok() || H5Dwrite(set.get(), type.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT,
                                padded.data()) < 0) {
        fail(path);
      }
    }
  }

  void close() {
    groups_.clear();
    if (H5Fflush(file_.get(), H5F_SCOPE_GLOBAL) < 0) fail("flush");
  }

 private:
  template <class T>
  void array(hid_t group, const std::string& name, const std::vector<T>& values, hid_t file_type,
             hid_t memory_type, const std::string& path) {
    const hsize_t n = values.size();
    Handle space(H5Screate_simple(1, &n, nullptr), H5Sclose);
    Handle set(H5Dcreate2(group, name.c_str(), file_type, space.get(), H5P_DEFAULT, H5P_DEFAULT,
                          H5P_DEFAULT),
               H5Dclose);
    if (!set.ok()) fail(path);
    if (n > 0 && H5Dwrite(set.get(), memory_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, values.data()) < 0) {
      fail(path);
    }
  }

  // Opens (creating as needed) the group at `path`, kept open for the entries after it.
  hid_t group_for(const std::string& path) {
    for (auto& [name, handle] : groups_) {
      if (name == path) return handle->get();
    }
    const std::size_t slash = path.rfind('/');
    const hid_t parent = slash == std::string::npos ? file_.get() : group_for(path.substr(0, slash));
    const std::string name = slash == std::string::npos ? path : path.substr(slash + 1);
    auto handle = std::make_unique<Handle>(
        H5Gcreate2(parent, name.c_str(), H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT), H5Gclose);
    if (!handle->ok()) fail(path);
    groups_.emplace_back(path, std::move(handle));
    return groups_.back().second->get();
  }

  [[noreturn]] void fail(const std::string& what) const {
    throw IoError("cannot write the state file " + final_.string() + " (HDF5 refused '" + what +
                  "' in " + partial_.string() + ")");
  }

  std::filesystem::path partial_;
  std::filesystem::path final_;
  Handle file_;
  // Closed before the file (the vector is cleared first in close(), and destroyed first).
  std::vector<std::pair<std::string, std::unique_ptr<Handle>>> groups_;
};

// ---- reading -----------------------------------------------------------------------------

struct Reader {
  const std::filesystem::path& path;
  hid_t file;

  std::string text_attribute(const char* name) const {
    if (H5Aexists(file, name) <= 0) refuse(path, name, "is missing: not a freshet state file");
    Handle attr(H5Aopen(file, name, H5P_DEFAULT), H5Aclose);
    Handle type(H5Aget_type(attr.get()), H5Tclose);
    if (!attr.ok() || !type.ok() || H5Tget_class(type.get()) != H5T_STRING ||
        H5Tis_variable_str(type.get()) > 0) {
      refuse(path, name, "is not a text: the file is damaged or not a freshet state file");
    }
    std::string s(H5Tget_size(type.get()), '\0');
    if (H5Aread(attr.get(), type.get(), s.data()) < 0) {
      refuse(path, name, "cannot be read: the file is damaged or truncated");
    }
    s.resize(s.find('\0') == std::string::npos ? s.size() : s.find('\0'));
    return s;
  }

  template <class T>
  T number_attribute(const char* name, hid_t memory_type, H5T_class_t wanted) const {
    if (H5Aexists(file, name) <= 0) refuse(path, name, "is missing: not a freshet state file");
    Handle attr(H5Aopen(file, name, H5P_DEFAULT), H5Aclose);
    Handle type(H5Aget_type(attr.get()), H5Tclose);
    Handle space(H5Aget_space(attr.get()), H5Sclose);
    T value{};
    if (!attr.ok() || !type.ok() || H5Tget_class(type.get()) != wanted ||
        H5Sget_simple_extent_npoints(space.get()) != 1 ||
        H5Aread(attr.get(), memory_type, &value) < 0) {
      refuse(path, name, "cannot be read as a number: the file is damaged or truncated");
    }
    return value;
  }

  static herr_t collect(hid_t /*group*/, const char* name, const H5L_info_t* /*info*/, void* data) {
    static_cast<std::vector<std::string>*>(data)->emplace_back(name);
    return 0;
  }

  StateArchive archive() const {
    std::vector<std::string> names;
    if (H5Lvisit(file, H5_INDEX_NAME, H5_ITER_INC, &Reader::collect, &names) < 0) {
      refuse(path, "contents", "cannot be listed: the file is damaged or truncated");
    }
    StateArchive a;
    for (const std::string& name : names) {
      Handle object(H5Oopen(file, name.c_str(), H5P_DEFAULT), H5Oclose);
      if (!object.ok()) refuse(path, name, "cannot be opened: the file is damaged or truncated");
      if (H5Iget_type(object.get()) != H5I_DATASET) continue;
      a.entries.emplace(name, dataset(object.get(), name));
    }
    return a;
  }

  StateArchive::Value dataset(hid_t set, const std::string& name) const {
    Handle type(H5Dget_type(set), H5Tclose);
    Handle space(H5Dget_space(set), H5Sclose);
    if (!type.ok() || !space.ok()) refuse(path, name, "cannot be read: the file is damaged");
    const hssize_t n = H5Sget_simple_extent_npoints(space.get());
    if (n < 0) refuse(path, name, "has no readable size: the file is damaged");
    const H5T_class_t kind = H5Tget_class(type.get());
    if (kind == H5T_STRING && H5Tis_variable_str(type.get()) <= 0 && n == 1) {
      std::string s(H5Tget_size(type.get()), '\0');
      if (H5Dread(set, type.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, s.data()) < 0) {
        refuse(path, name, "cannot be read: the file is damaged or truncated");
      }
      s.resize(s.find('\0') == std::string::npos ? s.size() : s.find('\0'));
      return s;
    }
    if (kind == H5T_FLOAT) return values<double>(set, name, n, H5T_NATIVE_DOUBLE);
    if (kind == H5T_INTEGER) return values<std::int64_t>(set, name, n, H5T_NATIVE_INT64);
    refuse(path, name, "is neither numbers nor a text: not a freshet state file");
  }

  template <class T>
  std::vector<T> values(hid_t set, const std::string& name, hssize_t n, hid_t memory_type) const {
    std::vector<T> v(static_cast<std::size_t>(n));
    if (n > 0 && H5Dread(set, memory_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, v.data()) < 0) {
      refuse(path, name, "cannot be read: the file is damaged or truncated");
    }
    return v;
  }
};

}  // namespace

std::string file_sha256(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream bytes;
  if (!in || !(bytes << in.rdbuf())) {
    throw IoError("cannot read '" + path.string() + "' to fingerprint it: " + std::strerror(errno));
  }
  return sha256_hex(bytes.str());
}

void write_state_file(const std::filesystem::path& path, StateFileHeader header,
                      const StateArchive& archive) {
  header.content_sha256 = archive.digest();
  AtomicOutputPath out(path, Overwrite::yes);
  {
    std::lock_guard lock(netcdf_global_mutex());
    silence_hdf5();
    Writer w(out.partial_path(), path);
    w.text_attribute("format", kStateFormatName);
    w.number_attribute("layout_version", header.layout_version, H5T_STD_I64LE, H5T_NATIVE_INT64);
    w.text_attribute("program_version", header.program_version);
    w.text_attribute("study_file", header.study_file);
    w.text_attribute("study_sha256", header.study_sha256);
    w.text_attribute("scenario", header.scenario);
    w.text_attribute("storm", header.storm);
    w.number_attribute("step", header.step, H5T_STD_I64LE, H5T_NATIVE_INT64);
    w.number_attribute("time_s", header.time_s, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE);
    w.text_attribute("content_sha256", header.content_sha256);
    for (const auto& [entry_path, value] : archive.entries) w.entry(entry_path, value);
    w.close();
  }
  out.commit();
}

StateFile read_state_file(const std::filesystem::path& path) {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(path, ec)) {
    throw IoError("cannot read the state file " + path.string() + ": no such file");
  }
  std::lock_guard lock(netcdf_global_mutex());
  silence_hdf5();
  if (H5Fis_hdf5(path.c_str()) <= 0) {
    refuse(path, "", "is not an HDF5 file, or is damaged or truncated (a state file is written "
                     "by route --save-state)");
  }
  Handle file(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), H5Fclose);
  if (!file.ok()) refuse(path, "", "cannot be opened as HDF5: the file is damaged or truncated");
  const Reader r{path, file.get()};
  StateFile f;
  if (r.text_attribute("format") != kStateFormatName) {
    refuse(path, "format", "is not '" + std::string(kStateFormatName) + "': not a freshet state file");
  }
  f.header.layout_version = r.number_attribute<std::int64_t>("layout_version", H5T_NATIVE_INT64,
                                                             H5T_INTEGER);
  if (f.header.layout_version != kStateLayoutVersion) {
    refuse(path, "layout_version",
           "= " + std::to_string(f.header.layout_version) + ": this freshet reads layout version " +
               std::to_string(kStateLayoutVersion) + " only (save the state again with this version)");
  }
  f.header.program_version = r.text_attribute("program_version");
  f.header.study_file = r.text_attribute("study_file");
  f.header.study_sha256 = r.text_attribute("study_sha256");
  f.header.scenario = r.text_attribute("scenario");
  f.header.storm = r.text_attribute("storm");
  f.header.step = r.number_attribute<std::int64_t>("step", H5T_NATIVE_INT64, H5T_INTEGER);
  f.header.time_s = r.number_attribute<double>("time_s", H5T_NATIVE_DOUBLE, H5T_FLOAT);
  f.header.content_sha256 = r.text_attribute("content_sha256");
  f.archive = r.archive();
  const std::string digest = f.archive.digest();
  if (digest != f.header.content_sha256) {
    refuse(path, "content_sha256",
           "= " + f.header.content_sha256 + ", but the contents hash to " + digest +
               ": the file was changed or damaged after it was written");
  }
  return f;
}

void check_state_file(const StateFile& file, const std::filesystem::path& path,
                      const StateFileHeader& expected) {
  const StateFileHeader& h = file.header;
  if (h.study_sha256 != expected.study_sha256) {
    refuse(path, "study_sha256",
           "= " + h.study_sha256 + " (saved from '" + h.study_file + "'), but '" +
               expected.study_file + "' has SHA-256 " + expected.study_sha256 +
               ": the state belongs to another study, or the basin file changed since");
  }
  const auto name = [](const std::string& scenario) {
    return scenario.empty() ? std::string("the base network") : "scenario '" + scenario + "'";
  };
  if (h.scenario != expected.scenario) {
    refuse(path, "scenario", "= '" + h.scenario + "': the state was saved from " + name(h.scenario) +
                                 ", this run is " + name(expected.scenario));
  }
  if (h.storm != expected.storm) {
    refuse(path, "storm", "= '" + h.storm + "': the state was saved from storm '" + h.storm +
                              "', this run routes storm '" + expected.storm + "'");
  }
}

}  // namespace freshet::io
