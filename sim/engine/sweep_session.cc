// Session loop: recorded prefixes in, points in order, checkpoint out.
#include "sim/engine/sweep_session.h"

#include "sim/io/curves_file.h"

namespace capgap {
namespace {

PointRecord ToRecord(const PointResult& r) {
  PointRecord p;
  p.ebno_db = r.ebno_db;
  p.units = static_cast<std::uint32_t>(r.units);
  p.counts = r.counts;
  p.finished = r.stop_reason != StopReason::kInterrupted;
  p.stop_reason = r.stop_reason;
  p.seconds = r.seconds;
  return p;
}

}  // namespace

SessionResult RunSession(const std::vector<Chain>& chains, const RunConfig& cfg, Checkpoint& ckpt,
                         const SessionOptions& options) {
  SessionResult out;
  out.points.resize(chains.size());
  const SweepConfig& run_sweep = cfg.sweep;

  // This session's config becomes the checkpoint's; records beyond the
  // configured points are dropped (CheckResumable kept the others' Eb/N0).
  ckpt.complete = false;
  ckpt.seed = run_sweep.seed;
  ckpt.kernel_target = options.kernel_target;
  ckpt.config_text = cfg.ResolvedText();
  std::vector<SchemeRecord> records;
  for (const Chain& chain : chains) {
    SchemeRecord rec;
    rec.name = chain.scheme().name;
    if (const SchemeRecord* old = ckpt.Find(rec.name)) rec.points = old->points;
    const std::size_t count = chain.scheme().ebno_db.size();
    if (rec.points.size() > count) rec.points.resize(count);
    records.push_back(std::move(rec));
  }
  ckpt.schemes = std::move(records);

  auto write = [&]() {
    ckpt.updated_utc = UtcNow();
    return WriteCheckpoint(options.checkpoint_path, ckpt);
  };
  auto warn = [&](const Status& s) {
    if (options.on_warning) options.on_warning("checkpoint not updated: " + s.message());
  };
  if (Status s = write(); !s.ok()) {
    out.status = s;
    return out;
  }

  for (std::size_t si = 0; si < chains.size(); ++si) {
    const Chain& chain = chains[si];
    SchemeRecord& rec = ckpt.schemes[si];
    // The scheme's own points (scheme.NAME.ebno_db, else sweep.ebno_db).
    const SweepConfig sweep = cfg.SweepFor(si);
    for (std::size_t i = 0; i < sweep.ebno_db.size(); ++i) {
      const auto point = static_cast<std::uint32_t>(i);
      PointStart start;
      if (i < rec.points.size()) {
        start.units = rec.points[i].units;
        start.counts = rec.points[i].counts;
        start.seconds = rec.points[i].seconds;
      } else {
        PointRecord fresh;
        fresh.ebno_db = sweep.ebno_db[i];
        rec.points.push_back(fresh);
      }
      if (options.on_point_begin) options.on_point_begin(si, point);
      EngineOptions eo = options.engine;
      eo.checkpoint_interval_seconds = sweep.checkpoint_seconds;
      eo.on_checkpoint = [&](const PointSnapshot& snap) {
        PointRecord& p = rec.points[i];
        p.units = snap.units;
        p.counts = snap.counts;
        p.seconds = snap.seconds;
        p.finished = false;
        p.stop_reason = StopReason::kInterrupted;
        if (Status s = write(); !s.ok()) warn(s);
      };
      const PointResult r = RunPoint(chain, sweep, point, sweep.ebno_db[i], eo, start);
      rec.points[i] = ToRecord(r);
      out.units_simulated += r.units_simulated;
      const Status saved = write();
      if (r.stop_reason == StopReason::kInterrupted) {
        if (!saved.ok()) {
          out.status = saved;
          return out;
        }
        out.end = SessionEnd::kInterrupted;
        return out;
      }
      if (!saved.ok()) warn(saved);
      out.units_counted += r.units;
      out.units_reused += start.units;
      if (options.on_point_done) options.on_point_done(chain.scheme().name, i, sweep.ebno_db.size(), r);
      out.points[si].push_back(r);
      if (SweepEndsAfter(r, sweep)) break;
    }
  }
  out.end = SessionEnd::kComplete;
  return out;
}

}  // namespace capgap
