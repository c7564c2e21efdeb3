// The impedance of a linearised network against frequency.
//
// What it computes: Z(jw) at a node, the voltage there when 1 A is injected into it (or,
// at a node held by its probe source, 1 V over the current the source delivers), with
// the network's admittance matrix Y(jw) = G + jw·C (small_signal_network.cpp); and the
// 3 dB corner, the lowest frequency where |Z| = |Z(0)|/sqrt(2).
//
// Method: at each frequency the complex matrix is factorised once (Eigen::SparseLU, the
// ordering analysed once for all frequencies, since the sparsity pattern does not change)
// and solved for every asked node. The corner is bracketed by a sweep of three points per
// decade from 1 uHz to 1 THz, shared by all nodes (the sweep stops once every node has
// crossed), then refined per node by the Illinois variant of regula falsi on
// ln|Z| - ln(|Z(0)|/sqrt(2)) against log10 f, to a relative width of 1e-7.
//
// Assumptions: |Z| is above the threshold at 1 uHz (otherwise the corner is reported as
// below that); a dip below the threshold narrower than a third of a decade between two
// sweep points, followed by a rise above it, can be missed.
#include "src/analyse/impedance_spectrum.hpp"

#include <Eigen/SparseLU>

#include <cmath>
#include <limits>

namespace mirrorcheck {

namespace {

using Complex = std::complex<double>;
using ComplexLu = Eigen::SparseLU<Eigen::SparseMatrix<Complex>, Eigen::COLAMDOrdering<int>>;

constexpr double lowest_frequency = 1e-6;
constexpr double highest_frequency = 1e12;
constexpr int sweep_points_per_decade = 3;

// Factorises Y at one frequency and solves for unit injections at the nodes.
class Solver {
public:
    Solver(const SmallSignalNetwork& network, double gmin) : network_(network), gmin_(gmin) {
        lu_.analyzePattern(network_.admittance_matrix(1.0, gmin_));
    }

    // Z at each node; NaN when the matrix is singular at this frequency.
    std::vector<Complex> impedances(double frequency, const std::vector<Port>& ports) {
        std::vector<Complex> z(ports.size(), Complex(std::nan(""), std::nan("")));
        lu_.factorize(network_.admittance_matrix(frequency, gmin_));
        if (lu_.info() != Eigen::Success || ports.empty()) return z;
        Eigen::MatrixXcd rhs = Eigen::MatrixXcd::Zero(network_.size(), static_cast<long>(ports.size()));
        for (std::size_t i = 0; i < ports.size(); ++i) {
            const Port& p = ports[i];
            if (p.branch >= 0) rhs(p.branch, static_cast<long>(i)) = p.sign;  // the node 1 V above the source's other end
            else rhs(p.node, static_cast<long>(i)) = 1.0;                     // 1 A into the node
        }
        Eigen::MatrixXcd v = lu_.solve(rhs);
        if (lu_.info() != Eigen::Success) return z;
        for (std::size_t i = 0; i < ports.size(); ++i) {
            const Port& p = ports[i];
            // The branch current flows from the source's + node through it to its - node.
            z[i] = p.branch >= 0 ? Complex(1.0) / (-p.sign * v(p.branch, static_cast<long>(i)))
                                 : v(p.node, static_cast<long>(i));
        }
        return z;
    }

    Complex impedance(double frequency, const Port& port) { return impedances(frequency, {port}).front(); }

private:
    const SmallSignalNetwork& network_;
    double gmin_;
    ComplexLu lu_;
};

// Illinois regula falsi on h(x) = ln|Z(10^x)| - ln(threshold), with h(lo) > 0 >= h(hi).
double refine_corner(Solver& solver, const Port& node, double threshold, double lo, double h_lo, double hi, double h_hi) {
    int stuck = 0;  // which end stayed last: -1 lo, +1 hi
    for (int iteration = 0; iteration < 100 && hi - lo > 1e-7 / std::log(10.0); ++iteration) {
        double x = hi - h_hi * (hi - lo) / (h_hi - h_lo);
        if (!(x > lo && x < hi)) x = 0.5 * (lo + hi);
        double h = std::log(std::abs(solver.impedance(std::pow(10.0, x), node))) - std::log(threshold);
        if (!std::isfinite(h)) {
            x = 0.5 * (lo + hi);
            h = std::log(std::abs(solver.impedance(std::pow(10.0, x), node))) - std::log(threshold);
            if (!std::isfinite(h)) break;
        }
        if (h > 0) {
            lo = x;
            h_lo = h;
            if (stuck == -1) h_hi *= 0.5;
            stuck = -1;
        } else {
            hi = x;
            h_hi = h;
            if (stuck == 1) h_lo *= 0.5;
            stuck = 1;
        }
        if (h == 0) return std::pow(10.0, x);
    }
    return std::pow(10.0, hi - h_hi * (hi - lo) / (h_hi - h_lo));
}

}  // namespace

std::vector<std::vector<Complex>> compute_impedance_spectrum(const SmallSignalNetwork& network, const std::vector<Port>& nodes,
                                                             const std::vector<double>& frequencies, double gmin) {
    std::vector<std::vector<Complex>> out;
    if (frequencies.empty() || network.size() == 0) return out;
    Solver solver(network, gmin);
    out.reserve(frequencies.size());
    for (double f : frequencies) out.push_back(solver.impedances(std::abs(f), nodes));
    return out;
}

std::vector<CornerFrequency> find_corner_frequencies(const SmallSignalNetwork& network, const std::vector<Port>& nodes,
                                                     const std::vector<double>& dc_magnitude, double gmin) {
    std::vector<CornerFrequency> out(nodes.size());
    if (nodes.empty() || network.size() == 0) return out;
    Solver solver(network, gmin);

    // Per node: the last sweep point above the threshold, and whether it has crossed.
    struct Track {
        double threshold = 0;
        double x_above = 0, h_above = 0;
        bool started = false, done = false;
    };
    std::vector<Track> track(nodes.size());
    for (std::size_t i = 0; i < nodes.size(); ++i) track[i].threshold = dc_magnitude[i] / std::sqrt(2.0);

    const int decades = static_cast<int>(std::lround(std::log10(highest_frequency / lowest_frequency)));
    std::size_t open = nodes.size();
    for (int k = 0; k <= decades * sweep_points_per_decade && open > 0; ++k) {
        const double x = std::log10(lowest_frequency) + static_cast<double>(k) / sweep_points_per_decade;
        std::vector<Complex> z = solver.impedances(std::pow(10.0, x), nodes);
        for (std::size_t i = 0; i < nodes.size(); ++i) {
            Track& t = track[i];
            if (t.done) continue;
            double h = std::log(std::abs(z[i])) - std::log(t.threshold);
            if (!std::isfinite(h)) continue;  // a singular point: try the next one
            if (h > 0) {
                t.x_above = x;
                t.h_above = h;
                t.started = true;
                continue;
            }
            t.done = true;
            --open;
            if (!t.started) {
                out[i].note = "the corner lies below 1 uHz";
                continue;
            }
            out[i].frequency = refine_corner(solver, nodes[i], t.threshold, t.x_above, t.h_above, x, h);
        }
    }
    for (std::size_t i = 0; i < nodes.size(); ++i)
        if (!track[i].done) out[i].note = "|Z| stays above |Z(0)|/sqrt(2) up to 1 THz";
    return out;
}

}  // namespace mirrorcheck
