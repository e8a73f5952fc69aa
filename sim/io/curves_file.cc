// HDF5 writer and reader of the curves file (HDF5 C++ API).
#include "sim/io/curves_file.h"

#include <unistd.h>

#include <cstdio>
#include <ctime>
#include <filesystem>
#include <string>
#include <type_traits>
#include <vector>

#include <H5Cpp.h>

#include "sim/io/atomic_file.h"
#include "sim/io/build_info.h"

namespace capgap {
namespace {

void StrAttr(H5::H5Object& obj, const char* name, const std::string& value) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  type.setCset(H5T_CSET_UTF8);
  H5::Attribute a = obj.createAttribute(name, type, H5::DataSpace(H5S_SCALAR));
  a.write(type, value);
}

template <typename T>
void NumAttr(H5::H5Object& obj, const char* name, const H5::PredType& type, T value) {
  H5::Attribute a = obj.createAttribute(name, type, H5::DataSpace(H5S_SCALAR));
  a.write(type, &value);
}

template <typename T>
void Dataset(H5::Group& g, const char* name, const H5::PredType& type, const std::vector<T>& v) {
  const hsize_t dims[1] = {v.size()};
  H5::DataSpace space(1, dims);
  H5::DataSet ds = g.createDataSet(name, type, space);
  if (!v.empty()) ds.write(v.data(), type);
}

// The dataset of one per-point quantity: get(point) for every point.
template <typename Get>
void PointDataset(H5::Group& g, const char* name, const H5::PredType& type,
                  const std::vector<PointResult>& points, Get get) {
  using T = std::decay_t<decltype(get(points.front()))>;
  std::vector<T> v;
  v.reserve(points.size());
  for (const PointResult& p : points) v.push_back(get(p));
  Dataset(g, name, type, v);
}

// Row-major rows x cols matrix.
void Matrix(H5::Group& g, const char* name, const H5::PredType& type, const std::vector<double>& v,
            hsize_t rows, hsize_t cols) {
  const hsize_t dims[2] = {rows, cols};
  H5::DataSpace space(2, dims);
  H5::DataSet ds = g.createDataSet(name, type, space);
  if (!v.empty()) ds.write(v.data(), type);
}

void StringDataset(H5::Group& g, const char* name, const std::vector<std::string>& v) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  type.setCset(H5T_CSET_UTF8);
  const hsize_t dims[1] = {v.size()};
  H5::DataSpace space(1, dims);
  H5::DataSet ds = g.createDataSet(name, type, space);
  std::vector<const char*> ptrs;
  for (const auto& s : v) ptrs.push_back(s.c_str());
  if (!ptrs.empty()) ds.write(ptrs.data(), type);
}

// A family's code report, attributes then datasets, in the family's order
// (int as NATIVE_INT, double as NATIVE_DOUBLE, series as int32, uint64 or
// double).
void WriteCodeReport(H5::Group g, const CodeReport& report) {
  for (const CodeReport::Attribute& a : report.attributes) {
    if (const auto* text = std::get_if<std::string>(&a.value)) {
      StrAttr(g, a.name.c_str(), *text);
    } else if (const auto* i = std::get_if<int>(&a.value)) {
      NumAttr(g, a.name.c_str(), H5::PredType::NATIVE_INT, *i);
    } else {
      NumAttr(g, a.name.c_str(), H5::PredType::NATIVE_DOUBLE, std::get<double>(a.value));
    }
  }
  for (const CodeReport::Dataset& d : report.datasets) {
    if (const auto* i32 = std::get_if<std::vector<std::int32_t>>(&d.values)) {
      Dataset(g, d.name.c_str(), H5::PredType::NATIVE_INT32, *i32);
    } else if (const auto* u64 = std::get_if<std::vector<std::uint64_t>>(&d.values)) {
      Dataset(g, d.name.c_str(), H5::PredType::NATIVE_UINT64, *u64);
    } else {
      Dataset(g, d.name.c_str(), H5::PredType::NATIVE_DOUBLE, std::get<std::vector<double>>(d.values));
    }
  }
}

}  // namespace

std::string UtcNow() {
  const std::time_t t = std::time(nullptr);
  std::tm tm{};
  gmtime_r(&t, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
  return buf;
}

Status WriteCurvesFile(const std::string& path, const RunMetadata& meta,
                       const std::vector<SchemeResult>& schemes) {
  namespace fs = std::filesystem;
  const fs::path final_path(path);
  std::error_code ec;
  if (final_path.has_parent_path()) fs::create_directories(final_path.parent_path(), ec);
  // The file is built in memory (HDF5 core driver, no backing store) and its
  // image written with plain POSIX calls (WriteFileAtomically): a full disk
  // or any other write error is then an ordinary Status, and no HDF5 handle
  // is ever left open on a file the library failed to flush (which crashed
  // the library's shutdown at exit). The C++ objects close every id, in
  // reverse order, on every path.
  const std::string image_name = path + ".image-" + std::to_string(::getpid());
  std::string image;
  H5::Exception::dontPrint();
  try {
    H5::FileAccPropList fapl;
    fapl.setCore(std::size_t{1} << 20, false);
    H5::H5File file(image_name, H5F_ACC_TRUNC, H5::FileCreatPropList::DEFAULT, fapl);
    StrAttr(file, "format", kCurvesFormat);
    NumAttr(file, "format_version", H5::PredType::NATIVE_INT, kCurvesFormatVersion);
    StrAttr(file, "program_version", ProgramVersion());
    StrAttr(file, "git_revision", GitRevision());
    StrAttr(file, "compiler", CompilerId());
    StrAttr(file, "build_type", BuildType());
    StrAttr(file, "created_utc", meta.created_utc);
    StrAttr(file, "command_line", meta.command_line);
    StrAttr(file, "config", meta.config_text);
    NumAttr(file, "threads", H5::PredType::NATIVE_INT, meta.threads);
    NumAttr(file, "ranks", H5::PredType::NATIVE_INT, meta.ranks);
    NumAttr(file, "seed", H5::PredType::NATIVE_UINT64, meta.seed);
    StrAttr(file, "kernel_target", meta.kernel_target);
    StrAttr(file, "demap_kernel_target", meta.demap_kernel_target);
    std::string order;
    for (const SchemeResult& r : schemes) order += (order.empty() ? "" : ",") + r.scheme.name;
    StrAttr(file, "schemes", order);

    for (const SchemeResult& r : schemes) {
      H5::Group g = file.createGroup("/" + r.scheme.name);
      StrAttr(g, "modulation", ToString(r.scheme.modulation));
      NumAttr(g, "bits_per_symbol", H5::PredType::NATIVE_INT, r.scheme.modulation.bits_per_symbol());
      StrAttr(g, "code", r.scheme.code);
      NumAttr(g, "code_rate", H5::PredType::NATIVE_DOUBLE, r.code_rate);
      NumAttr(g, "info_bits_per_symbol", H5::PredType::NATIVE_DOUBLE, r.info_bits_per_symbol);
      NumAttr(g, "spectral_efficiency", H5::PredType::NATIVE_DOUBLE, r.spectral_efficiency);
      StrAttr(g, "spectral_efficiency_basis", r.limits.spectral_efficiency_basis);
      NumAttr(g, "spectral_efficiency_ideal", H5::PredType::NATIVE_DOUBLE,
              r.spectral_efficiency_ideal);
      StrAttr(g, "shaping", ToString(r.scheme.shaping));
      NumAttr(g, "samples_per_symbol", H5::PredType::NATIVE_INT,
              r.scheme.shaping == PulseShape::kNone ? 1 : r.scheme.samples_per_symbol);
      if (r.scheme.shaping != PulseShape::kNone) {
        NumAttr(g, "rolloff", H5::PredType::NATIVE_DOUBLE, r.scheme.rolloff);
        NumAttr(g, "span", H5::PredType::NATIVE_INT, r.scheme.span);
        NumAttr(g, "timing_offset", H5::PredType::NATIVE_DOUBLE, r.scheme.timing_offset);
      }
      NumAttr(g, "phase_offset_deg", H5::PredType::NATIVE_DOUBLE, r.scheme.phase_offset_deg);
      NumAttr(g, "frequency_offset", H5::PredType::NATIVE_DOUBLE, r.scheme.frequency_offset);
      NumAttr(g, "seed", H5::PredType::NATIVE_UINT64, meta.seed);
      NumAttr(g, "target_ber", H5::PredType::NATIVE_DOUBLE, r.target_ber);
      StrAttr(g, "demapper", ToString(r.scheme.demapper));
      StrAttr(g, "source", ToString(r.scheme.source));
      NumAttr(g, "frame_bits", H5::PredType::NATIVE_UINT32, r.scheme.frame_bits);
      NumAttr(g, "unit_frames", H5::PredType::NATIVE_UINT32, r.scheme.ResolvedUnitFrames());

      // One dataset per per-point quantity, in this order.
      const auto& F64 = H5::PredType::NATIVE_DOUBLE;
      const auto& U64 = H5::PredType::NATIVE_UINT64;
      using P = const PointResult&;
      const auto& pts = r.points;
      PointDataset(g, "ebno_db", F64, pts, [](P p) { return p.ebno_db; });
      PointDataset(g, "esno_db", F64, pts, [](P p) { return p.esno_db; });
      PointDataset(g, "bits", U64, pts, [](P p) { return p.counts.bits; });
      PointDataset(g, "bit_errors", U64, pts, [](P p) { return p.counts.bit_errors; });
      PointDataset(g, "frames", U64, pts, [](P p) { return p.counts.frames; });
      PointDataset(g, "frame_errors", U64, pts, [](P p) { return p.counts.frame_errors; });
      PointDataset(g, "ber", F64, pts, [](P p) { return p.ber(); });
      PointDataset(g, "ber_low", F64, pts, [](P p) { return p.ber_ci.low; });
      PointDataset(g, "ber_high", F64, pts, [](P p) { return p.ber_ci.high; });
      PointDataset(g, "fer", F64, pts, [](P p) { return p.fer(); });
      PointDataset(g, "fer_low", F64, pts, [](P p) { return p.fer_ci.low; });
      PointDataset(g, "fer_high", F64, pts, [](P p) { return p.fer_ci.high; });
      PointDataset(g, "seconds", F64, pts, [](P p) { return p.seconds; });
      if (r.iterative) {
        // Iterative decoding per point: mean and largest iteration count of a
        // frame, and frames that converged to a wrong codeword.
        PointDataset(g, "decoder_iterations_mean", F64, pts, [](P p) {
          return p.counts.frames ? static_cast<double>(p.counts.decoder_iterations) /
                                       static_cast<double>(p.counts.frames)
                                 : 0.0;
        });
        PointDataset(g, "decoder_iterations_max", U64, pts,
                     [](P p) { return std::uint64_t{p.counts.max_decoder_iterations}; });
        PointDataset(g, "undetected_frame_errors", U64, pts,
                     [](P p) { return p.counts.undetected_frame_errors; });
      }
      std::vector<std::string> stop;
      for (const PointResult& p : pts) stop.push_back(ToString(p.stop_reason));
      StringDataset(g, "stop_reason", stop);

      H5::Group th = g.createGroup("theory");
      Dataset(th, "ebno_db", F64, r.theory.ebno_db);
      Dataset(th, "ber_uncoded", F64, r.theory.ber_uncoded);
      Dataset(th, "ser_uncoded", F64, r.theory.ser_uncoded);
      if (!r.theory.ber_uncoded_awgn.empty()) {
        Dataset(th, "ber_uncoded_awgn", F64, r.theory.ber_uncoded_awgn);
        StrAttr(th, "ber_uncoded_basis",
                "ber_uncoded, ser_uncoded: exact average over the scheme's fading and combining "
                "(MGF method, perfect channel state); ber_uncoded_awgn: the same modulation on "
                "AWGN");
      }
      if (!r.theory.uncoded_method.empty()) {
        StrAttr(th, "uncoded_method", r.theory.uncoded_method);
      }
      if (!r.theory.ber_bound.empty()) Dataset(th, "ber_bound", F64, r.theory.ber_bound);
      if (!r.theory.fer_bound.empty()) Dataset(th, "fer_bound", F64, r.theory.fer_bound);
      if (!r.theory.ber_bound.empty() || !r.theory.fer_bound.empty()) {
        StrAttr(th, "ber_bound_channel", r.theory.bound_channel);
      }

      if (r.code.present) WriteCodeReport(g.createGroup("code"), r.code);
      if (r.channel.present) WriteCodeReport(g.createGroup("channel"), r.channel);

      if (r.spectrum.present) {
        H5::Group sp = g.createGroup("spectrum");
        Dataset(sp, "frequency", F64, r.spectrum.frequency);
        Dataset(sp, "psd_db", F64, r.spectrum.psd_db);
        NumAttr(sp, "occupied_bandwidth_99", F64, r.spectrum.occupied_bandwidth_99);
        NumAttr(sp, "bandwidth_3db", F64, r.spectrum.bandwidth_3db);
        StrAttr(sp, "method", "Welch, Hann window, 50 % overlap; frequency in symbol rates");
      }

      if (r.signal.present) {
        H5::Group sg = g.createGroup("signal");
        Dataset(sg, "constellation_i", F64, r.signal.constellation_i);
        Dataset(sg, "constellation_q", F64, r.signal.constellation_q);
        NumAttr(sg, "constellation_ebno_db", F64, r.signal.constellation_ebno_db);
        StrAttr(sg, "constellation_basis",
                "demapper input: matched-filter output at the symbol instants, impairments and "
                "noise included, at the Eb/N0 needed for target_ber (else the last point)");
        if (r.signal.eye_traces > 0) {
          Dataset(sg, "eye_time", F64, r.signal.eye_time);
          Matrix(sg, "eye", F64, r.signal.eye, static_cast<hsize_t>(r.signal.eye_traces),
                 static_cast<hsize_t>(r.signal.eye_time.size()));
          StrAttr(sg, "eye_basis",
                  "in-phase matched-filter output, noise-free, no impairments; time in symbol "
                  "periods around the ideal sampling instant");
        }
      }

      H5::Group lim = g.createGroup("limits");
      NumAttr(lim, "shannon_ebno_db", F64, r.limits.shannon_ebno_db);
      NumAttr(lim, "constrained_ebno_db", F64, r.limits.constrained_ebno_db);
      StrAttr(lim, "spectral_efficiency_basis", r.limits.spectral_efficiency_basis);
      StrAttr(lim, "notes", r.limits.notes);
      if (r.limits.threshold_present) {
        NumAttr(lim, "threshold_ebno_db", F64, r.limits.threshold_ebno_db);
        NumAttr(lim, "threshold_sigma", F64, r.limits.threshold_sigma);
        StrAttr(lim, "threshold_method", r.limits.threshold_method);
        StrAttr(lim, "threshold_description", r.limits.threshold_description);
        StrAttr(lim, "threshold_channel", r.limits.threshold_channel);
        NumAttr(lim, "threshold_ga_ebno_db", F64, r.limits.threshold_ga_ebno_db);
        NumAttr(lim, "binary_input_ebno_db", F64, r.limits.binary_input_ebno_db);
      }
      Dataset(lim, "constrained_curve_rho", F64, r.limits.constrained_curve_rho);
      Dataset(lim, "constrained_curve_ebno_db", F64, r.limits.constrained_curve_ebno_db);
      if (r.limits.ergodic_present) {
        NumAttr(lim, "ergodic_shannon_ebno_db", F64, r.limits.ergodic_shannon_ebno_db);
        NumAttr(lim, "ergodic_constrained_ebno_db", F64, r.limits.ergodic_constrained_ebno_db);
        NumAttr(lim, "ergodic_bicm_ebno_db", F64, r.limits.ergodic_bicm_ebno_db);
        StrAttr(lim, "ergodic_basis",
                "mean Eb/N0 per branch where the ergodic capacity with receiver channel state "
                "equals rho = info_bits_per_symbol: Gaussian input, constellation (CM), BICM");
        Dataset(lim, "ergodic_curve_rho", F64, r.limits.ergodic_curve_rho);
        Dataset(lim, "ergodic_curve_ebno_db", F64, r.limits.ergodic_curve_ebno_db);
      }
      if (r.limits.outage_present) {
        NumAttr(lim, "outage_rate", F64, r.info_bits_per_symbol);
        NumAttr(lim, "outage_threshold_gaussian_esno_db", F64,
                r.limits.outage_threshold_gaussian_esno_db);
        NumAttr(lim, "outage_threshold_constrained_esno_db", F64,
                r.limits.outage_threshold_constrained_esno_db);
        StrAttr(lim, "outage_basis",
                "block fading: P(C(gamma) < rho) against mean Eb/N0 per branch, C the "
                "Gaussian-input capacity log2(1 + gamma) or the constellation's AWGN CM capacity");
        Dataset(lim, "outage_ebno_db", F64, r.limits.outage_ebno_db);
        Dataset(lim, "outage_probability_gaussian", F64, r.limits.outage_probability_gaussian);
        Dataset(lim, "outage_probability_constrained", F64,
                r.limits.outage_probability_constrained);
      }

      const analysis::FiniteLengthLimits& fl = r.limits.finite_length;
      if (fl.present) {
        H5::Group f = lim.createGroup("finite_length");
        NumAttr(f, "n", H5::PredType::NATIVE_INT, fl.n);
        NumAttr(f, "k", H5::PredType::NATIVE_INT, fl.k);
        NumAttr(f, "target_fer", F64, fl.target_fer);
        NumAttr(f, "normal_approximation_ebno_db", F64, fl.normal_approximation_ebno_db);
        NumAttr(f, "normal_approximation_gaussian_ebno_db", F64,
                fl.normal_approximation_gaussian_ebno_db);
        NumAttr(f, "rcu_ebno_db", F64, fl.rcu_ebno_db);
        NumAttr(f, "rcu_relative_std_error", F64, fl.rcu_relative_std_error);
        NumAttr(f, "converse_ebno_db", F64, fl.converse_ebno_db);
        NumAttr(f, "converse_relative_std_error", F64, fl.converse_relative_std_error);
        NumAttr(f, "converse_equal_power_ebno_db", F64, fl.converse_equal_power_ebno_db);
        StrAttr(f, "method", fl.method);
        Dataset(f, "ebno_db", F64, fl.ebno_db);
        Dataset(f, "fer_normal_approximation", F64, fl.fer_normal_approximation);
        Dataset(f, "fer_normal_approximation_gaussian", F64, fl.fer_normal_approximation_gaussian);
        Dataset(f, "fer_rcu", F64, fl.fer_rcu);
        Dataset(f, "fer_converse", F64, fl.fer_converse);
      } else {
        StrAttr(lim, "finite_length_absent", fl.absent_reason);
      }

      H5::Group sum = g.createGroup("summary");
      const Summary& s = r.summary;
      NumAttr(sum, "ebno_at_target_db", F64, s.ebno_at_target_db);
      NumAttr(sum, "ebno_at_target_low_db", F64, s.ebno_at_target_low_db);
      NumAttr(sum, "ebno_at_target_high_db", F64, s.ebno_at_target_high_db);
      NumAttr(sum, "uncoded_ebno_at_target_db", F64, s.uncoded_ebno_at_target_db);
      NumAttr(sum, "coding_gain_db", F64, s.coding_gain_db);
      NumAttr(sum, "gap_to_shannon_db", F64, s.gap_to_shannon_db);
      NumAttr(sum, "gap_to_constrained_db", F64, s.gap_to_constrained_db);
      if (r.limits.ergodic_present) NumAttr(sum, "gap_to_ergodic_db", F64, s.gap_to_ergodic_db);
      NumAttr(sum, "target_fer", F64, r.target_fer);
      NumAttr(sum, "ebno_at_target_fer_db", F64, s.ebno_at_target_fer_db);
      NumAttr(sum, "ebno_at_target_fer_low_db", F64, s.ebno_at_target_fer_low_db);
      NumAttr(sum, "ebno_at_target_fer_high_db", F64, s.ebno_at_target_fer_high_db);
      if (r.limits.outage_present) NumAttr(sum, "gap_to_outage_db", F64, s.gap_to_outage_db);
      if (fl.present) NumAttr(sum, "gap_to_finite_length_db", F64, s.gap_to_finite_length_db);
      if (r.limits.threshold_present) {
        NumAttr(sum, "gap_to_threshold_db", F64, s.gap_to_threshold_db);
        NumAttr(sum, "gap_to_binary_input_db", F64, s.gap_to_binary_input_db);
      }
    }
    file.flush(H5F_SCOPE_GLOBAL);
    const ssize_t size = H5Fget_file_image(file.getId(), nullptr, 0);
    if (size <= 0) return Status::Error(path + ": HDF5 write failed: no file image");
    image.resize(static_cast<std::size_t>(size));
    if (H5Fget_file_image(file.getId(), image.data(), image.size()) != size) {
      return Status::Error(path + ": HDF5 write failed: file image incomplete");
    }
    file.close();
  } catch (const H5::Exception& e) {
    return Status::Error(path + ": HDF5 write failed: " + e.getDetailMsg());
  }
  // Temporary file, fsync, rename, fsync of the directory: a kill, full disk
  // or power loss at any instant leaves the previous file or the new one,
  // both complete.
  return WriteFileAtomically(final_path.string(), image);
}

}  // namespace capgap
