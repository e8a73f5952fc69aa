// Fuzz target: capgap's validation of curves files (ParseCurvesImage). The
// input does not become the file's bytes (arbitrary bytes mostly exercise
// the HDF5 library's own decoder, see fuzz_curves_bytes.cc); it drives a
// generator that writes a curves file through the HDF5 API, in memory, with
// every object the summary reads either as the writer lays it out or
// hostile: missing, of the wrong kind (group/dataset/soft link), of the wrong
// type class, an array or null-dataspace attribute, a 2-D, scalar, short,
// long or 100001-entry dataset, and counts drawn from the input (so
// bit_errors > bits and frame_errors > frames occur). A file that reads must
// hold curves of equal lengths and consistent counts; the summary table of
// it is formatted.
#include <fuzzer/FuzzedDataProvider.h>
#include <unistd.h>

#include <H5Cpp.h>

#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <vector>

#include "sim/io/curves_file.h"
#include "sim/io/summary_table.h"

namespace {

using capgap::StoredRun;

class Generator {
 public:
  explicit Generator(FuzzedDataProvider& in) : in_(in) {}

  // A scalar or hostile attribute: kind 0 string, 1 number, 2 integer.
  void Attr(H5::H5Object& obj, const char* name, int kind, const std::string& text = "x") {
    const int how = in_.ConsumeIntegralInRange(0, 11);
    if (how == 4) return;  // missing
    int k = kind;
    if (how == 5) k = (kind + 1 + in_.ConsumeIntegralInRange(0, 1)) % 3;  // wrong class
    H5::DataSpace space(H5S_SCALAR);
    hsize_t count = 1;
    if (how == 6) {
      count = in_.ConsumeIntegralInRange<hsize_t>(0, 1000);
      space = H5::DataSpace(1, &count);
    } else if (how == 7) {
      space = H5::DataSpace(H5S_NULL);
      count = 0;
    }
    if (k == 0) {
      H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
      std::vector<std::string> values(count, how == 8 ? in_.ConsumeRandomLengthString(64) : text);
      std::vector<const char*> ptrs;
      for (const auto& v : values) ptrs.push_back(how == 9 ? nullptr : v.c_str());
      H5::Attribute a = obj.createAttribute(name, type, space);
      if (count > 0) a.write(type, ptrs.data());
    } else if (k == 1) {
      std::vector<double> values(count, how == 8 ? in_.ConsumeFloatingPoint<double>() : 1.0);
      H5::Attribute a = obj.createAttribute(name, H5::PredType::NATIVE_DOUBLE, space);
      if (count > 0) a.write(H5::PredType::NATIVE_DOUBLE, values.data());
    } else {
      std::vector<std::int64_t> values(count, how == 8 ? in_.ConsumeIntegral<std::int64_t>() : 1);
      H5::Attribute a = obj.createAttribute(name, H5::PredType::NATIVE_INT64, space);
      if (count > 0) a.write(H5::PredType::NATIVE_INT64, values.data());
    }
  }

  // A per-point dataset of n entries (kind 0 string, 1 number, 2 count).
  void Series(H5::Group& g, const char* name, int kind, hsize_t n) {
    const int how = in_.ConsumeIntegralInRange(0, 15);
    if (how == 5) return;  // missing
    if (how == 6) {
      g.createGroup(name);
      return;
    }
    if (how == 7) {
      g.link(H5L_TYPE_SOFT, in_.ConsumeBool() ? "bits" : "nowhere", name);
      return;
    }
    int k = kind;
    if (how == 8) k = (kind + 1 + in_.ConsumeIntegralInRange(0, 1)) % 3;
    H5::DataSpace space;
    hsize_t length = n;
    bool write = true;
    if (how == 9) {
      const hsize_t dims[2] = {n, in_.ConsumeIntegralInRange<hsize_t>(0, 3)};
      space = H5::DataSpace(2, dims);
      length = dims[0] * dims[1];
    } else if (how == 10) {
      space = H5::DataSpace(H5S_SCALAR);
      length = 1;
    } else if (how == 11) {
      length = in_.ConsumeIntegralInRange<hsize_t>(0, 8);
      space = H5::DataSpace(1, &length);
    } else if (how == 12) {
      length = capgap::kMaxCurvePoints + 1;  // declared, never written
      space = H5::DataSpace(1, &length);
      write = false;
    } else {
      space = H5::DataSpace(1, &length);
    }
    if (k == 0) {
      H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
      H5::DataSet ds = g.createDataSet(name, type, space);
      std::vector<const char*> v(length, "stop_bits");
      if (write && length > 0) ds.write(v.data(), type);
    } else if (k == 1) {
      H5::DataSet ds = g.createDataSet(name, H5::PredType::NATIVE_DOUBLE, space);
      std::vector<double> v(length);
      for (auto& x : v) x = in_.ConsumeFloatingPoint<double>();
      if (write && length > 0) ds.write(v.data(), H5::PredType::NATIVE_DOUBLE);
    } else {
      H5::DataSet ds = g.createDataSet(name, H5::PredType::NATIVE_INT64, space);
      std::vector<std::int64_t> v(length);
      for (auto& x : v) x = in_.ConsumeIntegralInRange<std::int64_t>(-2, 1 << 20);
      if (write && length > 0) ds.write(v.data(), H5::PredType::NATIVE_INT64);
    }
  }

  H5::Group MaybeGroup(H5::Group& parent, const char* name) {
    const int how = in_.ConsumeIntegralInRange(0, 9);
    if (how == 5) {  // a dataset where the group belongs, then a hidden group
      const hsize_t one = 1;
      parent.createDataSet(name, H5::PredType::NATIVE_DOUBLE, H5::DataSpace(1, &one));
      return parent.createGroup(std::string(name) + "_");
    }
    if (how == 6) return parent.createGroup(std::string(name) + "_");  // missing
    return parent.createGroup(name);
  }

  void Scheme(H5::H5File& f, const std::string& name) {
    H5::Group root = f.openGroup("/");
    H5::Group g = MaybeGroup(root, name.c_str());
    for (const char* a : {"modulation", "demapper", "code"}) Attr(g, a, 0, "qpsk");
    for (const char* a : {"code_rate", "info_bits_per_symbol", "spectral_efficiency",
                          "spectral_efficiency_ideal", "target_ber"}) {
      Attr(g, a, 1);
    }
    const hsize_t n = in_.ConsumeIntegralInRange<hsize_t>(0, 6);
    Series(g, "ebno_db", 1, n);
    for (const char* d : {"bits", "bit_errors", "frames", "frame_errors"}) Series(g, d, 2, n);
    for (const char* d : {"esno_db", "ber", "ber_low", "ber_high", "fer", "fer_low", "fer_high",
                          "seconds"}) {
      Series(g, d, 1, n);
    }
    Series(g, "stop_reason", 0, n);
    const bool iterative = in_.ConsumeBool();
    if (iterative) {
      Series(g, "decoder_iterations_mean", 1, n);
      Series(g, "decoder_iterations_max", 2, n);
      Series(g, "undetected_frame_errors", 2, n);
    }
    H5::Group lim = MaybeGroup(g, "limits");
    Attr(lim, "shannon_ebno_db", 1);
    Attr(lim, "constrained_ebno_db", 1);
    const bool threshold = in_.ConsumeBool();
    if (threshold) {
      Attr(lim, "threshold_ebno_db", 1);
      Attr(lim, "threshold_method", 0, "ga");
      Attr(lim, "binary_input_ebno_db", 1);
    }
    H5::Group sum = MaybeGroup(g, "summary");
    for (const char* a : {"ebno_at_target_db", "ebno_at_target_low_db", "ebno_at_target_high_db",
                          "uncoded_ebno_at_target_db", "coding_gain_db", "gap_to_shannon_db",
                          "gap_to_constrained_db", "gap_to_threshold_db", "gap_to_binary_input_db"}) {
      Attr(sum, a, 1);
    }
    if (threshold || in_.ConsumeBool()) {
      H5::Group code = MaybeGroup(g, "code");
      for (const char* a : {"description", "decoder", "schedule"}) Attr(code, a, 0, "ldpc");
      Attr(code, "girth", 2);
    }
  }

  void File(H5::H5File& f) {
    Attr(f, "format", 0, capgap::kCurvesFormat);
    Attr(f, "format_version", 2);
    Attr(f, "program_version", 0);
    Attr(f, "created_utc", 0);
    Attr(f, "threads", 2);
    const int schemes = in_.ConsumeIntegralInRange(1, 3);
    std::string list;
    for (int i = 0; i < schemes; ++i) {
      const std::string name = "s" + std::to_string(i);
      Scheme(f, name);
      list += (list.empty() ? "" : ",") + name;
    }
    const int how = in_.ConsumeIntegralInRange(0, 7);
    if (how == 4) list += ",s0";
    if (how == 5) list += ",gone";
    if (how == 6) list += "," + in_.ConsumeRandomLengthString(16);
    if (how != 7) Attr(f, "schemes", 0, list);
  }

 private:
  FuzzedDataProvider& in_;
};

std::string Image(FuzzedDataProvider& in) {
  static int files = 0;
  H5::FileAccPropList fapl;
  fapl.setCore(std::size_t{1} << 16, false);
  const std::string name = "/proc/self/capgap-fuzz-" + std::to_string(::getpid()) + "-" +
                           std::to_string(files++);
  H5::H5File f(name, H5F_ACC_TRUNC, H5::FileCreatPropList::DEFAULT, fapl);
  Generator(in).File(f);
  f.flush(H5F_SCOPE_GLOBAL);
  const ssize_t size = H5Fget_file_image(f.getId(), nullptr, 0);
  std::string image(size > 0 ? static_cast<std::size_t>(size) : 0, '\0');
  if (size > 0) H5Fget_file_image(f.getId(), image.data(), image.size());
  return image;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  H5::Exception::dontPrint();
  FuzzedDataProvider in(data, size);
  std::string image;
  try {
    image = Image(in);
  } catch (const H5::Exception&) {
    return 0;  // a layout the library refuses to write (e.g. a name clash)
  }
  auto run = capgap::ParseCurvesImage(image, "fuzz.h5");
  if (!run.ok()) return 0;
  for (const capgap::StoredScheme& s : run.value().schemes) {
    const std::size_t n = s.ebno_db.size();
    if (s.bits.size() != n || s.bit_errors.size() != n || s.ber.size() != n) std::abort();
    if (s.has_threshold && (s.decoder_iterations_mean.size() != n ||
                            s.undetected_frame_errors.size() != n)) {
      std::abort();
    }
    for (std::size_t i = 0; i < n; ++i) {
      if (s.bit_errors[i] > s.bits[i]) std::abort();
    }
  }
  (void)capgap::FormatSummaryTable(run.value());
  return 0;
}
