// The DC solve of a small-signal network at one port: the resistance there, and the range
// it spans over the stamps the op data leaves open. Shared by the whole-circuit solve
// (linearise.cpp) and the solve of each mirror alone (own_resistance.cpp).
#pragma once

#include <optional>
#include <string>
#include <utility>

#include <Eigen/Sparse>
#include <Eigen/SparseLU>

#include "src/analyse/linearise.hpp"
#include "src/analyse/small_signal_network.hpp"

namespace mirrorcheck {

// The DC factorisation of a network. When G is singular (a node with no DC path to ground,
// e.g. a node only between capacitors), 1e-12 S is added from every node to ground, the
// default `gmin` of SPICE, and `note` says so.
class DcSolver {
public:
    // With `shunt`, gmin is added from the start (a part of a circuit whose other parts
    // needed it: the whole circuit is solved with one gmin).
    explicit DcSolver(const SmallSignalNetwork& network, bool shunt = false);

    const std::string& failure() const { return failure_; }  // why G could not be factorised; empty when it could
    const std::string& note() const { return note_; }        // the gmin shunt, when added
    double gmin() const { return gmin_; }

    // See Port (small_signal_network.hpp): 1 A into the node, or 1 V from its probe source.
    std::optional<double> resistance(const Port& port);
    // The resistance at the low and high corners of the bounded stamps: the first-order
    // sensitivity of Z to each stamp (one transposed solve with the same factorisation,
    // dZ = -lambda^T dG x, G^T lambda = the output functional) picks the end that moves Z
    // most each way, then Z is solved exactly at both corners.
    std::optional<std::pair<double, double>> range(const Port& port, double estimate);

private:
    using Lu = Eigen::SparseLU<Eigen::SparseMatrix<double>, Eigen::COLAMDOrdering<int>>;
    const SmallSignalNetwork& network_;
    Lu lu_;
    double gmin_ = 0;
    std::string failure_;
    std::string note_;
};

// Fills r.resistance and, when the network has bounded stamps, r.resistance_low/high.
void solve_port(LinearisedImpedance& r, DcSolver& dc, const Port& port);

}  // namespace mirrorcheck
