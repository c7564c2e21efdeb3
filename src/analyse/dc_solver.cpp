// The DC solve of a small-signal network at one port (dc_solver.hpp).
#include "src/analyse/dc_solver.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

namespace mirrorcheck {

namespace {

constexpr double shunt_gmin = 1e-12;

// The excitation for a port and the functional that reads its impedance: 1 A into the node
// (Z = x[node]), or 1 V from its probe source (Z = 1/q, q = -sign·x[branch]).
Eigen::VectorXd excitation(const Port& port, long size) {
    Eigen::VectorXd j = Eigen::VectorXd::Zero(size);
    if (port.branch >= 0) j[port.branch] = port.sign;
    else j[port.node] = 1.0;
    return j;
}

std::optional<double> impedance_of(const Port& port, const Eigen::VectorXd& x) {
    const double z = port.branch >= 0 ? 1.0 / (-port.sign * x[port.branch]) : x[port.node];
    if (!std::isfinite(z)) return std::nullopt;
    return z;
}

}  // namespace

DcSolver::DcSolver(const SmallSignalNetwork& network, bool shunt) : network_(network) {
    if (network_.size() == 0) {
        failure_ = "the circuit has no nodes besides ground";
        return;
    }
    Eigen::SparseMatrix<double> a;
    if (!shunt) {
        a = network_.conductance_matrix(0.0);
        lu_.analyzePattern(a);
        lu_.factorize(a);
        if (lu_.info() == Eigen::Success) return;
    }
    // Singular: a node without a DC path to ground. Shunt every node with SPICE's gmin.
    gmin_ = shunt_gmin;
    a = network_.conductance_matrix(gmin_);
    lu_.analyzePattern(a);
    lu_.factorize(a);
    if (lu_.info() != Eigen::Success)
        failure_ = "the network is singular (a loop of voltage sources or shorts?)";
    else
        note_ = "singular network: 1e-12 S added from every node to ground";
}

std::optional<double> DcSolver::resistance(const Port& port) {
    Eigen::VectorXd x = lu_.solve(excitation(port, network_.size()));
    if (lu_.info() != Eigen::Success) return std::nullopt;
    return impedance_of(port, x);
}

std::optional<std::pair<double, double>> DcSolver::range(const Port& port, double estimate) {
    if (network_.bounded.empty()) return std::nullopt;
    const long n = network_.size();
    Eigen::VectorXd x = lu_.solve(excitation(port, n));
    if (lu_.info() != Eigen::Success) return std::nullopt;
    Eigen::VectorXd c = Eigen::VectorXd::Zero(n);
    const double q = port.branch >= 0 ? -port.sign * x[port.branch] : 0.0;
    if (port.branch >= 0) c[port.branch] = -port.sign;
    else c[port.node] = 1.0;
    Eigen::VectorXd lambda = lu_.transpose().solve(c);
    if (lu_.info() != Eigen::Success) return std::nullopt;
    // First-order change of Z when stamp k goes to each end.
    std::vector<int> high(network_.bounded.size(), -1), low(network_.bounded.size(), -1);
    for (std::size_t k = 0; k < network_.bounded.size(); ++k) {
        double best_up = 0, best_down = 0;
        for (int end = 0; end < 2; ++end) {
            double dq = 0;
            for (const auto& t : network_.bounded_change(k, end)) dq -= lambda[t.row()] * t.value() * x[t.col()];
            const double dz = port.branch >= 0 ? -dq / (q * q) : dq;
            if (dz > best_up) {
                best_up = dz;
                high[k] = end;
            }
            if (dz < best_down) {
                best_down = dz;
                low[k] = end;
            }
        }
    }
    double lo = estimate, hi = estimate;
    for (const auto* ends : {&low, &high}) {
        Lu corner;
        Eigen::SparseMatrix<double> a = network_.conductance_matrix(gmin_, ends);
        corner.analyzePattern(a);
        corner.factorize(a);
        if (corner.info() != Eigen::Success) return std::nullopt;
        Eigen::VectorXd xc = corner.solve(excitation(port, n));
        auto z = impedance_of(port, xc);
        if (!z) return std::nullopt;
        lo = std::min(lo, *z);
        hi = std::max(hi, *z);
    }
    return std::pair{lo, hi};
}

void solve_port(LinearisedImpedance& r, DcSolver& dc, const Port& port) {
    r.resistance = dc.resistance(port);
    if (!r.resistance) return;
    if (auto range = dc.range(port, *r.resistance)) {
        r.resistance_low = range->first;
        r.resistance_high = range->second;
    }
}

}  // namespace mirrorcheck
