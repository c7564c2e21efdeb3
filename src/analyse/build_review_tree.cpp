// Builds the review tree from the passes' results: each mirror's outputs with their three
// resistance values, comparisons, headroom and ratio; each transistor once, with its region
// and its operating point in fixed, typed fields; then join_findings places every finding.
#include "src/analyse/build_review_tree.hpp"

#include <algorithm>
#include <map>
#include <unordered_map>

#include "parsers/common/text.hpp"
#include "src/analyse/by_output.hpp"

namespace mirrorcheck {
namespace {

MosValues mos_values(const DeviceOp& d) {
    return {d.get("id"), d.get("vgs"), d.get("vds"), d.get("vbs"), d.get("vth"),
            d.get("vdsat"), d.get("gm"), d.get("gds"), d.get("gmb")};
}

BipolarValues bipolar_values(const DeviceOp& d) {
    std::optional<double> vce = d.get("vce");
    if (!vce && d.get("vbe") && d.get("vbc")) vce = *d.get("vbe") - *d.get("vbc");
    return {d.get("ic"), d.get("ib"), d.get("vbe"), d.get("vbc"), vce, d.get("gm"), d.get("gpi"), d.get("gmu"), d.get("go")};
}

class TreeBuilder {
public:
    explicit TreeBuilder(const ReviewParts& parts)
        : p_(parts), own_(parts.own), simulated_own_(parts.simulated_own), linearised_(parts.linearised),
          simulated_(parts.simulated), reconciliation_(parts.reconciliation.outputs) {}

    ReviewTree build() {
        tree_.tool = this_tool();
        tree_.inputs = p_.inputs;
        tree_.settings = p_.settings;
        tree_.display_names = p_.names;
        tree_.assumptions = p_.assumptions;
        tree_.notes = p_.op.notes;
        tree_.solve_notes = p_.solve_notes;
        tree_.findings = p_.findings;
        tree_.devices.reserve(p_.op.devices.size());  // at most every transistor with op data, once
        for (std::size_t k = 0; k < p_.mirrors.size() && k < p_.inspection.mirrors.size(); ++k)
            tree_.mirrors.push_back(mirror(p_.mirrors[k], p_.inspection.mirrors[k]));
        join_findings(tree_);
        return std::move(tree_);
    }

private:
    const ReviewParts& p_;
    const ByMirrorNode<OwnResistance> own_;
    const ByMirrorNode<SimulatedOwn> simulated_own_;
    const ByNode<LinearisedImpedance> linearised_;
    const ByNode<SimulatedImpedance> simulated_;
    const ByMirrorNode<OutputReconciliation> reconciliation_;
    ReviewTree tree_;
    std::map<std::size_t, std::size_t> device_index_;  // circuit index -> tree index

    std::size_t device(const DeviceRegion& r) {
        auto [it, added] = device_index_.try_emplace(r.device, tree_.devices.size());
        if (!added) return it->second;
        const Device& d = p_.circuit.devices()[r.device];
        ReviewDevice e;
        e.name = d.name;
        e.designer_name = designer_name(p_.names, d.name);
        e.instance = d.instance_path();
        e.type = d.model ? d.model->type : "";
        e.mos = d.kind != DeviceKind::bjt;
        e.region = r.region;
        e.healthy = r.current_source;
        e.saturation_voltage = r.saturation_voltage;
        e.margin = r.headroom;
        e.low_margin = r.low_margin;
        if (const DeviceOp* op = p_.op.device(d.name)) {
            e.mos = op->is_mos;
            if (op->is_mos) e.mos_values = mos_values(*op);
            else e.bipolar_values = bipolar_values(*op);
            for (const auto& [name, value] : op->values)
                for (auto set : {CapacitanceSet::meyer, CapacitanceSet::charge, CapacitanceSet::bipolar})
                    for (auto c : capacitance_quantities(set))
                        if (c == name) e.capacitances[name] = value;
        }
        tree_.devices.push_back(std::move(e));
        return it->second;
    }

    std::optional<double> current(const Device& d) const {
        const DeviceOp* op = p_.op.device(d.name);
        if (!op) return std::nullopt;
        return op->get(op->is_mos ? "id" : "ic");
    }

    ReviewResistance resistance(const Mirror& m, const OutputInspection& oi) {
        ReviewResistance r;
        r.inspection = oi.best();
        r.reflection = oi.reflection.value;
        for (const RoutLevel& l : oi.levels) {
            std::size_t index = tree_.devices.size();
            for (const DeviceRegion& d : oi.devices)
                if (d.device == l.device) index = device(d);
            r.levels.push_back({index, l.ro, l.gm, l.gmb, l.rs, l.rout});
        }
        if (const auto* own = own_.find(m.id, oi.node)) {
            r.own = own->value;
            r.own_devices = own->devices;
            r.own_held = own->held;
        }
        if (r.own.node.empty()) r.own.node = to_lower(oi.node);
        if (const auto* own = simulated_own_.find(m.id, oi.node)) r.own_simulated = *own;
        if (const auto* lin = linearised_.find(oi.node)) r.linearised = *lin;
        else r.linearised.node = to_lower(oi.node);
        if (const auto* sim = simulated_.find(oi.node)) r.simulated = *sim;
        else r.simulated.node = to_lower(oi.node);
        if (const auto* rec = reconciliation_.find(m.id, oi.node)) r.comparisons = rec->comparisons;
        return r;
    }

    ReviewMirror mirror(const Mirror& m, const MirrorInspection& mi) {
        ReviewMirror e;
        e.id = m.id;
        e.label = designer_name(p_.names, m.id);
        e.family = mirror_family_label(m);
        e.reference_node = m.reference_node;
        for (const DeviceRegion& r : mi.reference) e.reference.push_back(device(r));
        for (std::size_t j = 0; j < m.outputs.size() && j < mi.outputs.size(); ++j) {
            const MirrorOutput& o = m.outputs[j];
            const OutputInspection& oi = mi.outputs[j];
            ReviewOutput out;
            out.node = o.node;
            for (const DeviceRegion& r : oi.devices) out.devices.push_back(device(r));
            if (!m.reference.empty()) out.reference_current = current(p_.circuit.devices()[m.reference.front()]);
            out.output_current = current(p_.circuit.devices()[o.devices.front()]);
            out.ratio = oi.ratio;
            out.rout = resistance(m, oi);
            out.headroom = oi.headroom;
            std::vector<std::size_t> candidates = out.devices;
            candidates.insert(candidates.end(), e.reference.begin(), e.reference.end());
            for (std::size_t d : candidates)
                if (!out.worst_device || tree_.devices[d].margin < tree_.devices[*out.worst_device].margin)
                    out.worst_device = d;
            e.outputs.push_back(std::move(out));
        }
        return e;
    }
};

bool names_output(const ReviewTree& tree, const Finding& f, const ReviewOutput& o) {
    if (iequals(f.subject, o.node)) return true;
    return std::any_of(o.devices.begin(), o.devices.end(),
                       [&](std::size_t d) { return iequals(f.subject, tree.devices[d].name); });
}

}  // namespace

ReviewTree build_review_tree(const ReviewParts& parts) { return TreeBuilder(parts).build(); }

void join_findings(ReviewTree& tree) {
    sort_findings(tree.findings);
    tree.circuit_findings.clear();
    tree.summary = ReviewSummary{};
    for (auto& m : tree.mirrors)
        for (auto& o : m.outputs) o.findings.clear();
    std::unordered_map<std::string, std::vector<ReviewMirror*>> by_id;  // lower-case id
    for (auto& m : tree.mirrors) by_id[to_lower(m.id)].push_back(&m);
    for (std::size_t k = 0; k < tree.findings.size(); ++k) {
        const Finding& f = tree.findings[k];
        bool placed = false;
        auto mirrors = f.mirror.empty() ? by_id.end() : by_id.find(to_lower(f.mirror));
        for (ReviewMirror* mp : mirrors == by_id.end() ? std::vector<ReviewMirror*>{} : mirrors->second) {
            ReviewMirror& m = *mp;
            const bool one_output = std::any_of(m.outputs.begin(), m.outputs.end(),
                                                [&](const ReviewOutput& o) { return names_output(tree, f, o); });
            for (auto& o : m.outputs)
                if (!one_output || names_output(tree, f, o)) {
                    o.findings.push_back(k);
                    placed = true;
                }
        }
        if (!placed) tree.circuit_findings.push_back(k);
        if (f.waived) ++tree.summary.waived;
        else if (f.severity == Severity::error) ++tree.summary.errors;
        else if (f.severity == Severity::warning) ++tree.summary.warnings;
        else ++tree.summary.infos;
        if (fails_review(f, tree.settings.fail_on)) tree.summary.passed = false;
    }
    for (auto& m : tree.mirrors) {
        ++tree.summary.mirrors;
        for (auto& o : m.outputs) {
            ++tree.summary.outputs;
            o.worst_severity.reset();
            o.status = OutputStatus::pass;
            for (std::size_t k : o.findings) {
                const Finding& f = tree.findings[k];
                if (f.waived) continue;
                if (!o.worst_severity || f.severity < *o.worst_severity) o.worst_severity = f.severity;
                if (fails_review(f, tree.settings.fail_on)) o.status = OutputStatus::fail;
            }
            if (o.status == OutputStatus::fail) ++tree.summary.failed_outputs;
        }
    }
}

}  // namespace mirrorcheck
