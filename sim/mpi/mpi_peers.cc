// MpiPeers and the worker ranks' entry (see mpi_peers.h).
#include "sim/mpi/mpi_peers.h"

#include <ostream>

#include "blocks/kernels/awgn_kernels.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {
namespace {

// How a worker rank reports a construction stopped by a signal.
constexpr char kStoppedWhileBuilding[] = "stopped by signal while building";

}  // namespace

MpiPeers::MpiPeers(MpiWorld& world) : world_(world) {}
MpiPeers::~MpiPeers() = default;

void MpiPeers::Release() {
  std::string none;
  world_.ShareConfig(&none);
}

Status MpiPeers::Start(const std::string& config_text, std::vector<std::string>* notes) {
  std::string text = config_text;
  world_.ShareConfig(&text);
  std::vector<std::string> kernels;
  const auto errors = world_.GatherReadiness("", NoiseKernelTarget(), &kernels);
  coordinator_ = std::make_unique<MpiCoordinator>(world_.size());
  // A rank stopped by a signal while building a code: the run stops (75)
  // rather than fails.
  for (int r = 1; r < world_.size(); ++r) {
    const std::string& e = errors[static_cast<std::size_t>(r)];
    if (e.rfind(kStoppedWhileBuilding, 0) == 0) {
      coordinator_->Shutdown(kExitStopped, 10);
      return Status::Stopped("rank " + std::to_string(r) + ": " + e);
    }
  }
  for (int r = 1; r < world_.size(); ++r) {
    if (!errors[static_cast<std::size_t>(r)].empty()) {
      coordinator_->Shutdown(1, 10);
      return Status::Error("rank " + std::to_string(r) + ": " +
                           errors[static_cast<std::size_t>(r)]);
    }
  }
  for (int r = 1; r < world_.size(); ++r) {
    if (kernels[static_cast<std::size_t>(r)] != kernels[0]) {
      notes->push_back("rank " + std::to_string(r) + " runs the " +
                       kernels[static_cast<std::size_t>(r)] + " noise kernels, rank 0 " +
                       kernels[0] +
                       "; their float rounding differs, so counts can differ slightly from a "
                       "single-process run (use --scalar on every rank for identical counts)");
      break;
    }
  }
  return Status::Ok();
}

void MpiPeers::BeginPoint(std::size_t scheme, std::uint32_t point) {
  coordinator_->BeginPoint(scheme, point);
}

std::string MpiPeers::failure() const { return coordinator_ ? coordinator_->failure() : ""; }

void MpiPeers::Finish(SessionEnd end, const std::string& ckpt_path, std::ostream& err) {
  if (!coordinator_) return;
  const int worker_status = end == SessionEnd::kComplete      ? 0
                            : end == SessionEnd::kInterrupted ? kExitStopped
                                                              : 1;
  if (!coordinator_->failure().empty()) world_.Abort(kExitStopped);  // said by Run
  if (!coordinator_->Shutdown(worker_status, 10)) {
    err << "capgap: a rank did not answer STOP; checkpoint " << ckpt_path << " saved\n"
        << std::flush;
    world_.Abort(end == SessionEnd::kComplete ? 1 : kExitStopped);
  }
}

int RunMpiWorkerRank(MpiWorld& world, const std::string& config_path,
                     const std::atomic<bool>* interrupt) {
  std::string text;
  world.ShareConfig(&text);
  if (text.empty()) return 1;  // rank 0 failed during setup and said why
  RunConfig cfg;
  std::vector<Chain> chains;
  std::string error;
  auto parsed = ParseRunConfig(text, config_path, {});
  if (!parsed.ok()) {
    error = parsed.status().message();
  } else {
    cfg = std::move(parsed).value();
    // As on rank 0: the signal flag reaches long constructions (PEG, the
    // encoder's elimination), and memory estimates count this rank's threads.
    BuildContext build;
    build.stop = interrupt;
    build.threads = ResolveThreadCount(cfg.sweep.threads);
    for (const SchemeConfig& s : cfg.schemes) {
      auto chain = Chain::Create(s, cfg.sweep.seed, build);
      if (!chain.ok()) {
        error = chain.status().stopped()
                    ? std::string(kStoppedWhileBuilding) + " the code of scheme '" + s.name + "'"
                    : chain.status().message();
        chains.clear();
        break;
      }
      chains.push_back(std::move(chain).value());
    }
  }
  std::vector<std::string> kernels;
  world.GatherReadiness(error, NoiseKernelTarget(), &kernels);
  return RunMpiWorker(chains, cfg, interrupt);
}

}  // namespace capgap
