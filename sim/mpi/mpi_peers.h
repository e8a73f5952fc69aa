// The MPI side of `capgap run` behind sim/run/run.h's RunPeers: rank 0 sees
// the other ranks as MpiPeers (config sharing, readiness, the unit exchange
// of mpi_run.h, the final STOP), and every other rank runs RunMpiWorkerRank.
// Compiled only with -DCAPGAP_MPI=ON.
#ifndef CAPGAP_SIM_MPI_MPI_PEERS_H_
#define CAPGAP_SIM_MPI_MPI_PEERS_H_

#include <atomic>
#include <memory>
#include <string>
#include <vector>

#include "sim/mpi/mpi_run.h"
#include "sim/run/run.h"

namespace capgap {

// Rank 0's view of the other ranks of `world` (size > 1).
class MpiPeers final : public RunPeers {
 public:
  explicit MpiPeers(MpiWorld& world);
  ~MpiPeers() override;
  int size() const override { return world_.size(); }
  void Release() override;
  Status Start(const std::string& config_text, std::vector<std::string>* notes) override;
  UnitExchange* exchange() override { return coordinator_.get(); }
  void BeginPoint(std::size_t scheme, std::uint32_t point) override;
  std::string failure() const override;
  void Finish(SessionEnd end, const std::string& ckpt_path, std::ostream& err) override;

 private:
  MpiWorld& world_;
  std::unique_ptr<MpiCoordinator> coordinator_;
};

// A rank other than 0: receives the config from rank 0, builds the same
// chains, reports readiness and computes units until rank 0 says STOP.
// `config_path` is CONFIG of the command line (the same on every rank): the
// text comes from rank 0, but relative paths in it (an LDPC base matrix or
// matrix file) are taken from the config file's directory, as on rank 0.
// Returns the exit status.
int RunMpiWorkerRank(MpiWorld& world, const std::string& config_path,
                     const std::atomic<bool>* interrupt);

}  // namespace capgap

#endif  // CAPGAP_SIM_MPI_MPI_PEERS_H_
