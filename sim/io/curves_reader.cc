// Validating reader of the curves file (see curves_file.h): the layout is
// checked object by object before a value is read, and every refusal names
// the object.
#include <atomic>
#include <cmath>
#include <cstring>
#include <optional>
#include <set>
#include <string_view>

#include <H5Cpp.h>

#include "blocks/core/file_read.h"
#include "sim/io/curves_file.h"

namespace capgap {
namespace {

// A refusal inside the reader: "OBJECT: RULE"; turned into a Status once, at
// the top (nothing throws out of this file).
struct Refusal {
  std::string message;
};

[[noreturn]] void Refuse(const std::string& object, const std::string& rule) {
  throw Refusal{object + ": " + rule};
}

std::string Child(const std::string& parent, const std::string& name) {
  return parent == "/" ? "/" + name : parent + "/" + name;
}

std::string AttrName(const std::string& object, const char* name) {
  return object + " attribute '" + name + "'";
}

enum class Cls { kNumber, kInteger, kString };

const char* ClsName(Cls c) {
  switch (c) {
    case Cls::kNumber: return "number";
    case Cls::kInteger: return "integer";
    case Cls::kString: return "string";
  }
  return "?";
}

std::string TypeClassName(H5T_class_t c) {
  switch (c) {
    case H5T_INTEGER: return "integer";
    case H5T_FLOAT: return "floating-point";
    case H5T_STRING: return "string";
    case H5T_COMPOUND: return "compound";
    case H5T_ENUM: return "enum";
    case H5T_VLEN: return "variable-length sequence";
    case H5T_ARRAY: return "array";
    case H5T_OPAQUE: return "opaque";
    case H5T_BITFIELD: return "bitfield";
    case H5T_REFERENCE: return "reference";
    case H5T_TIME: return "time";
    default: return "unknown";
  }
}

bool ClassFits(H5T_class_t have, Cls want) {
  switch (want) {
    case Cls::kNumber: return have == H5T_FLOAT || have == H5T_INTEGER;
    case Cls::kInteger: return have == H5T_INTEGER;
    case Cls::kString: return have == H5T_STRING;
  }
  return false;
}

std::string ObjectKindName(H5O_type_t t) {
  switch (t) {
    case H5O_TYPE_GROUP: return "group";
    case H5O_TYPE_DATASET: return "dataset";
    case H5O_TYPE_NAMED_DATATYPE: return "named datatype";
    default: return "object of unknown kind";
  }
}

// `name` below `loc` exists as a hard link to an object of kind `want`.
void RequireChild(const H5::Group& loc, const std::string& loc_path, const std::string& name,
                  H5O_type_t want) {
  const std::string object = Child(loc_path, name);
  const htri_t exists = H5Lexists(loc.getId(), name.c_str(), H5P_DEFAULT);
  if (exists <= 0) Refuse(object, ObjectKindName(want) + " missing");
  H5L_info_t info{};
  if (H5Lget_info(loc.getId(), name.c_str(), &info, H5P_DEFAULT) < 0) {
    Refuse(object, "cannot read the link");
  }
  // A soft link may dangle and an external one opens another file: refused.
  if (info.type != H5L_TYPE_HARD) {
    Refuse(object, "is a soft or external link; expected a " + ObjectKindName(want));
  }
  const H5O_type_t have = loc.childObjType(name);
  if (have != want) Refuse(object, "is a " + ObjectKindName(have) + ", expected a " + ObjectKindName(want));
}

H5::Group OpenGroup(const H5::Group& loc, const std::string& loc_path, const std::string& name) {
  RequireChild(loc, loc_path, name, H5O_TYPE_GROUP);
  return loc.openGroup(name);
}

bool HasAttr(const H5::H5Object& obj, const char* name) { return obj.attrExists(name); }

// A scalar attribute of class `want`, opened.
H5::Attribute ScalarAttr(const H5::H5Object& obj, const std::string& object, const char* name,
                         Cls want) {
  if (!obj.attrExists(name)) Refuse(object, std::string("attribute '") + name + "' missing");
  const std::string what = AttrName(object, name);
  H5::Attribute a = obj.openAttribute(name);
  const H5::DataSpace space = a.getSpace();
  const H5S_class_t kind = space.getSimpleExtentType();
  if (kind == H5S_NULL) Refuse(what, std::string("empty (null dataspace), expected a scalar ") + ClsName(want));
  if (kind != H5S_SCALAR) {
    Refuse(what, "array of " + std::to_string(space.getSimpleExtentNpoints()) +
                     " entries, expected a scalar " + ClsName(want));
  }
  const H5T_class_t have = a.getTypeClass();
  if (!ClassFits(have, want)) {
    Refuse(what, TypeClassName(have) + " value, expected a " + ClsName(want));
  }
  return a;
}

// Reads a checked scalar attribute as `type` (HDF5 converts the number).
template <typename T>
T ReadScalar(const H5::H5Object& obj, const std::string& object, const char* name, Cls cls,
             const H5::PredType& type) {
  T v{};
  H5::Attribute a = ScalarAttr(obj, object, name, cls);
  try {
    a.read(type, &v);
  } catch (const H5::Exception& e) {
    Refuse(AttrName(object, name), "cannot be read (" + e.getDetailMsg() + ")");
  }
  return v;
}

double NumberAttr(const H5::H5Object& obj, const std::string& object, const char* name) {
  return ReadScalar<double>(obj, object, name, Cls::kNumber, H5::PredType::NATIVE_DOUBLE);
}

int IntAttr(const H5::H5Object& obj, const std::string& object, const char* name) {
  return ReadScalar<int>(obj, object, name, Cls::kInteger, H5::PredType::NATIVE_INT);
}

// Fixed-length strings of at most kMaxCurveStringBytes, or variable-length
// ones (a null variable-length string reads as "").
std::string StrAttr(const H5::H5Object& obj, const std::string& object, const char* name) {
  H5::Attribute a = ScalarAttr(obj, object, name, Cls::kString);
  const H5::StrType type = a.getStrType();
  if (type.isVariableStr()) {
    char* text = nullptr;
    if (H5Aread(a.getId(), type.getId(), &text) < 0) Refuse(AttrName(object, name), "cannot read");
    std::string out = text ? std::string(text) : std::string();
    if (text) H5free_memory(text);
    return out;
  }
  const std::size_t size = type.getSize();
  if (size > kMaxCurveStringBytes) {
    Refuse(AttrName(object, name), "string of " + std::to_string(size) + " bytes; at most " +
                                       std::to_string(kMaxCurveStringBytes) + " are read");
  }
  std::string out(size, '\0');
  if (size > 0 && H5Aread(a.getId(), type.getId(), out.data()) < 0) {
    Refuse(AttrName(object, name), "cannot read");
  }
  out.resize(std::strlen(out.c_str()));
  return out;
}

// A per-point dataset of one scheme: 1-D, class `want`, `points` entries
// (or at most kMaxCurvePoints when points is empty: /ebno_db itself).
struct Series {
  std::string object;
  H5::DataSet dataset;
  hsize_t length = 0;
};

Series CheckSeries(const H5::Group& g, const std::string& gpath, const char* name, Cls want,
                   std::optional<hsize_t> points, const std::string& points_object) {
  RequireChild(g, gpath, name, H5O_TYPE_DATASET);
  Series s{Child(gpath, name), g.openDataSet(name), 0};
  const std::string expected =
      points ? "expected 1-D of " + std::to_string(*points) + " entries" : "expected 1-D";
  const H5T_class_t have = s.dataset.getTypeClass();
  if (!ClassFits(have, want)) {
    Refuse(s.object, TypeClassName(have) + " dataset, expected " + ClsName(want) + "s");
  }
  const H5::DataSpace space = s.dataset.getSpace();
  const H5S_class_t kind = space.getSimpleExtentType();
  if (kind == H5S_SCALAR) Refuse(s.object, "scalar dataset, " + expected);
  if (kind != H5S_SIMPLE) Refuse(s.object, "empty (null dataspace) dataset, " + expected);
  const int rank = space.getSimpleExtentNdims();
  if (rank != 1) Refuse(s.object, std::to_string(rank) + "-D dataset, " + expected);
  hsize_t dims[1] = {0};
  space.getSimpleExtentDims(dims);
  s.length = dims[0];
  if (s.length > kMaxCurvePoints) {
    Refuse(s.object, std::to_string(s.length) + " entries; at most " +
                         std::to_string(kMaxCurvePoints) + " points are read");
  }
  if (points && s.length != *points) {
    Refuse(s.object, std::to_string(s.length) + " entries, expected " + std::to_string(*points) +
                         " (the length of " + points_object + ")");
  }
  return s;
}

template <typename T>
std::vector<T> ReadSeries(const Series& s, const H5::PredType& type) {
  std::vector<T> v(static_cast<std::size_t>(s.length));
  try {
    if (!v.empty()) s.dataset.read(v.data(), type);
  } catch (const H5::Exception& e) {
    Refuse(s.object, "cannot be read (" + e.getDetailMsg() + ")");
  }
  return v;
}

bool SchemeNameOk(const std::string& name) {
  if (name.empty() || name.size() > 256) return false;
  bool only_dots = true;
  for (const char c : name) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                    c == '_' || c == '-' || c == '.';
    if (!ok) return false;
    only_dots = only_dots && c == '.';
  }
  return !only_dots;
}

// The scheme groups in run order: the root attribute "schemes" when present
// (names separated by commas), else every group below the root.
std::vector<std::string> SchemeNames(const H5::H5File& file) {
  std::vector<std::string> names;
  const H5::Group root = file.openGroup("/");
  if (HasAttr(file, "schemes")) {
    const std::string order = StrAttr(file, "/", "schemes");
    std::size_t start = 0;
    while (start <= order.size() && !order.empty()) {
      std::size_t comma = order.find(',', start);
      if (comma == std::string::npos) comma = order.size();
      names.push_back(order.substr(start, comma - start));
      if (names.size() > kMaxCurveSchemes) {
        Refuse(AttrName("/", "schemes"), "more than " + std::to_string(kMaxCurveSchemes) + " schemes");
      }
      start = comma + 1;
    }
    std::set<std::string> seen;
    for (const std::string& n : names) {
      if (!SchemeNameOk(n)) {
        Refuse(AttrName("/", "schemes"),
               "scheme name '" + n.substr(0, 64) +
                   "': expected letters, digits, '_', '-' and '.' (a group below the root)");
      }
      if (!seen.insert(n).second) Refuse(AttrName("/", "schemes"), "scheme '" + n + "' listed twice");
      RequireChild(root, "/", n, H5O_TYPE_GROUP);
    }
    return names;
  }
  const hsize_t count = file.getNumObjs();
  if (count > kMaxCurveSchemes) {
    Refuse("/", std::to_string(count) + " objects; at most " + std::to_string(kMaxCurveSchemes) +
                    " schemes are read");
  }
  for (hsize_t i = 0; i < count; ++i) {
    const std::string n = file.getObjnameByIdx(i);
    H5L_info_t info{};
    if (H5Lget_info(root.getId(), n.c_str(), &info, H5P_DEFAULT) < 0 || info.type != H5L_TYPE_HARD) {
      continue;
    }
    if (root.childObjType(n) == H5O_TYPE_GROUP) names.push_back(n);
  }
  return names;
}

StoredScheme ReadScheme(const H5::H5File& file, const std::string& name) {
  const H5::Group root = file.openGroup("/");
  const std::string gp = "/" + name;
  const H5::Group g = OpenGroup(root, "/", name);
  StoredScheme s;
  s.name = name;

  // Layout first: every object the summary reads, with its shape and type.
  const Series ebno = CheckSeries(g, gp, "ebno_db", Cls::kNumber, std::nullopt, "");
  const hsize_t n = ebno.length;
  const std::string ebno_object = ebno.object;
  auto series = [&](const char* ds, Cls c) { return CheckSeries(g, gp, ds, c, n, ebno_object); };
  const Series bits = series("bits", Cls::kInteger);
  const Series bit_errors = series("bit_errors", Cls::kInteger);
  const Series frames = series("frames", Cls::kInteger);
  const Series frame_errors = series("frame_errors", Cls::kInteger);
  const Series ber = series("ber", Cls::kNumber);
  for (const char* ds : {"esno_db", "ber_low", "ber_high", "fer", "fer_low", "fer_high", "seconds"}) {
    series(ds, Cls::kNumber);
  }
  series("stop_reason", Cls::kString);
  const H5::Group lim = OpenGroup(g, gp, "limits");
  const H5::Group sum = OpenGroup(g, gp, "summary");
  const std::string lp = gp + "/limits", sp = gp + "/summary";
  s.has_threshold = HasAttr(lim, "threshold_ebno_db");
  const auto has = [&](const char* ds) { return H5Lexists(g.getId(), ds, H5P_DEFAULT) > 0; };
  std::optional<Series> it_mean, undetected;
  if (s.has_threshold || has("decoder_iterations_mean")) {
    it_mean = series("decoder_iterations_mean", Cls::kNumber);
  }
  if (s.has_threshold || has("undetected_frame_errors")) {
    undetected = series("undetected_frame_errors", Cls::kInteger);
  }
  if (has("decoder_iterations_max")) series("decoder_iterations_max", Cls::kInteger);

  // Attributes (each checked scalar and of its class as it is read).
  s.modulation = StrAttr(g, gp, "modulation");
  s.demapper = StrAttr(g, gp, "demapper");
  s.code = StrAttr(g, gp, "code");
  s.code_rate = NumberAttr(g, gp, "code_rate");
  s.info_bits_per_symbol = NumberAttr(g, gp, "info_bits_per_symbol");
  s.spectral_efficiency = NumberAttr(g, gp, "spectral_efficiency");
  s.spectral_efficiency_ideal = HasAttr(g, "spectral_efficiency_ideal")
                                    ? NumberAttr(g, gp, "spectral_efficiency_ideal")
                                    : s.spectral_efficiency;
  s.target_ber = NumberAttr(g, gp, "target_ber");
  s.shannon_ebno_db = NumberAttr(lim, lp, "shannon_ebno_db");
  s.constrained_ebno_db = NumberAttr(lim, lp, "constrained_ebno_db");
  s.summary.ebno_at_target_db = NumberAttr(sum, sp, "ebno_at_target_db");
  s.summary.ebno_at_target_low_db = NumberAttr(sum, sp, "ebno_at_target_low_db");
  s.summary.ebno_at_target_high_db = NumberAttr(sum, sp, "ebno_at_target_high_db");
  s.summary.uncoded_ebno_at_target_db = NumberAttr(sum, sp, "uncoded_ebno_at_target_db");
  s.summary.coding_gain_db = NumberAttr(sum, sp, "coding_gain_db");
  s.summary.gap_to_shannon_db = NumberAttr(sum, sp, "gap_to_shannon_db");
  s.summary.gap_to_constrained_db = NumberAttr(sum, sp, "gap_to_constrained_db");
  if (s.has_threshold) {
    s.threshold_ebno_db = NumberAttr(lim, lp, "threshold_ebno_db");
    s.threshold_method = StrAttr(lim, lp, "threshold_method");
    s.binary_input_ebno_db = NumberAttr(lim, lp, "binary_input_ebno_db");
    s.summary.gap_to_threshold_db = NumberAttr(sum, sp, "gap_to_threshold_db");
    s.summary.gap_to_binary_input_db = NumberAttr(sum, sp, "gap_to_binary_input_db");
    const H5::Group code = OpenGroup(g, gp, "code");
    const std::string cp = gp + "/code";
    s.code_description = StrAttr(code, cp, "description");
    s.decoder_description = StrAttr(code, cp, "decoder") + ", " + StrAttr(code, cp, "schedule");
    s.code_girth = IntAttr(code, cp, "girth");
  }

  if (has("channel")) {
    const H5::Group ch = OpenGroup(g, gp, "channel");
    const std::string chp = gp + "/channel";
    s.has_channel = true;
    s.channel = StrAttr(ch, chp, "channel");
    s.fading = StrAttr(ch, chp, "fading");
    s.combining = StrAttr(ch, chp, "combining");
    s.branches = IntAttr(ch, chp, "branches");
  }
  s.has_ergodic = HasAttr(lim, "ergodic_shannon_ebno_db");
  if (s.has_ergodic) {
    s.ergodic_shannon_ebno_db = NumberAttr(lim, lp, "ergodic_shannon_ebno_db");
    s.ergodic_constrained_ebno_db = NumberAttr(lim, lp, "ergodic_constrained_ebno_db");
    s.ergodic_bicm_ebno_db = NumberAttr(lim, lp, "ergodic_bicm_ebno_db");
    s.summary.gap_to_ergodic_db = NumberAttr(sum, sp, "gap_to_ergodic_db");
  }
  s.has_fer = HasAttr(sum, "ebno_at_target_fer_db");
  if (s.has_fer) {
    s.target_fer = NumberAttr(sum, sp, "target_fer");
    s.summary.ebno_at_target_fer_db = NumberAttr(sum, sp, "ebno_at_target_fer_db");
    s.summary.ebno_at_target_fer_low_db = NumberAttr(sum, sp, "ebno_at_target_fer_low_db");
    s.summary.ebno_at_target_fer_high_db = NumberAttr(sum, sp, "ebno_at_target_fer_high_db");
  }
  s.has_finite_length = HasAttr(sum, "gap_to_finite_length_db");
  if (s.has_finite_length) {
    const H5::Group fl = OpenGroup(lim, lp, "finite_length");
    s.finite_length_na_ebno_db =
        NumberAttr(fl, lp + "/finite_length", "normal_approximation_ebno_db");
    s.summary.gap_to_finite_length_db = NumberAttr(sum, sp, "gap_to_finite_length_db");
  }
  s.has_outage = HasAttr(sum, "gap_to_outage_db");
  if (s.has_outage) s.summary.gap_to_outage_db = NumberAttr(sum, sp, "gap_to_outage_db");

  // Values, then the rules between them: a count read is never trusted.
  s.ebno_db = ReadSeries<double>(ebno, H5::PredType::NATIVE_DOUBLE);
  s.ber = ReadSeries<double>(ber, H5::PredType::NATIVE_DOUBLE);
  s.bits = ReadSeries<std::uint64_t>(bits, H5::PredType::NATIVE_UINT64);
  s.bit_errors = ReadSeries<std::uint64_t>(bit_errors, H5::PredType::NATIVE_UINT64);
  const auto f = ReadSeries<std::uint64_t>(frames, H5::PredType::NATIVE_UINT64);
  const auto fe = ReadSeries<std::uint64_t>(frame_errors, H5::PredType::NATIVE_UINT64);
  if (it_mean) s.decoder_iterations_mean = ReadSeries<double>(*it_mean, H5::PredType::NATIVE_DOUBLE);
  if (undetected) {
    s.undetected_frame_errors = ReadSeries<std::uint64_t>(*undetected, H5::PredType::NATIVE_UINT64);
  }
  for (std::size_t i = 0; i < s.ebno_db.size(); ++i) {
    const std::string at = "entry " + std::to_string(i);
    if (!std::isfinite(s.ebno_db[i])) Refuse(ebno.object, at + " is not a finite Eb/N0");
    if (s.bit_errors[i] > s.bits[i]) {
      Refuse(bit_errors.object, at + " is " + std::to_string(s.bit_errors[i]) + " > " +
                                    bits.object + " = " + std::to_string(s.bits[i]));
    }
    if (fe[i] > f[i]) {
      Refuse(frame_errors.object, at + " is " + std::to_string(fe[i]) + " > " + frames.object +
                                      " = " + std::to_string(f[i]));
    }
    if (undetected && s.undetected_frame_errors[i] > fe[i]) {
      Refuse(undetected->object, at + " is " + std::to_string(s.undetected_frame_errors[i]) +
                                     " > " + frame_errors.object + " = " + std::to_string(fe[i]));
    }
  }
  return s;
}

// HDF5's signature, at offset 0 or at a user-block size (512, 1024, ...).
bool HasHdf5Signature(const std::string& bytes) {
  static constexpr char kSignature[] = "\x89HDF\r\n\x1a\n";
  for (std::size_t at = 0; at + 8 <= bytes.size(); at = at == 0 ? 512 : at * 2) {
    if (std::memcmp(bytes.data() + at, kSignature, 8) == 0) return true;
  }
  return false;
}

}  // namespace

Result<StoredRun> ParseCurvesImage(const std::string& bytes, const std::string& source) {
  if (!HasHdf5Signature(bytes)) return Status::Error(source + ": not an HDF5 file");
  H5::Exception::dontPrint();
  try {
    // The bytes become a read-only in-memory file (core driver, no backing
    // store): HDF5 never touches the path.
    H5::FileAccPropList fapl;
    fapl.setCore(std::size_t{1} << 16, false);
    if (H5Pset_file_image(fapl.getId(), const_cast<char*>(bytes.data()), bytes.size()) < 0) {
      return Status::Error(source + ": cannot hand the file to HDF5");
    }
    // The core driver refuses a name that exists on disk; this one cannot
    // (nothing may be created below /proc/self), and a counter keeps two
    // open images apart.
    static std::atomic<std::uint64_t> images{0};
    const std::string image_name = "/proc/self/capgap-curves-image-" + std::to_string(images++);
    std::optional<H5::H5File> opened;
    try {
      opened.emplace(image_name, H5F_ACC_RDONLY, H5::FileCreatPropList::DEFAULT, fapl);
    } catch (const H5::Exception&) {
      return Status::Error(source + ": not a readable HDF5 file");
    }
    const H5::H5File& file = *opened;
    if (!HasAttr(file, "format") || StrAttr(file, "/", "format") != kCurvesFormat) {
      return Status::Error(source + ": not a capgap curves file (attribute format != '" +
                           std::string(kCurvesFormat) + "')");
    }
    const int version = IntAttr(file, "/", "format_version");
    if (version != kCurvesFormatVersion) {
      return Status::Error(source + ": format_version " + std::to_string(version) +
                           " is not supported (this program reads " +
                           std::to_string(kCurvesFormatVersion) + ")");
    }
    StoredRun run;
    run.program_version = StrAttr(file, "/", "program_version");
    run.created_utc = StrAttr(file, "/", "created_utc");
    run.threads = IntAttr(file, "/", "threads");
    if (HasAttr(file, "ranks")) run.ranks = IntAttr(file, "/", "ranks");
    for (const std::string& name : SchemeNames(file)) run.schemes.push_back(ReadScheme(file, name));
    return run;
  } catch (const Refusal& r) {
    return Status::Error(source + ": " + r.message);
  } catch (const H5::Exception& e) {
    return Status::Error(source + ": cannot read curves file: " + e.getFuncName() + ": " +
                         e.getDetailMsg());
  }
}

Result<StoredRun> ReadCurvesFile(const std::string& path) {
  Result<std::string> bytes = ReadRegularFile(path, kMaxCurvesFileBytes, "curves file");
  if (!bytes.ok()) return bytes.status();
  return ParseCurvesImage(bytes.value(), path);
}

}  // namespace capgap
