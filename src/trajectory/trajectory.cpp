#include "trajectory/trajectory.hpp"

#include <algorithm>
#include <stdexcept>

#include "trajectory/poly.hpp"

namespace plateau::traj {

namespace {

// Chunks of ~64 KiB: below glibc's mmap threshold, so they come from (and go back to) the heap's free lists,
// and small enough that the last, partly filled chunk wastes little.
constexpr std::size_t kChunkDoubles = 8192;
// Freed chunks kept per thread for the next trajectory (at most this many doubles: 32 MiB), so a run does not
// page-fault fresh memory that the previous run just gave back.
constexpr std::size_t kPoolDoubles = std::size_t{4} << 20;
// Largest state block regenerated on the stack (states × (order + 1)).
constexpr std::size_t kMaxRegenerated = 1024;


struct Pool {
    std::vector<std::vector<double>> free;
    std::size_t doubles = 0;
};
thread_local Pool pool;

}  // namespace

Trajectory::Trajectory(int n_series, int order) : n_series_(n_series), order_(order) {
    if (n_series < 1 || order < 0) throw std::invalid_argument("Trajectory: bad shape");
    stride_ = static_cast<std::size_t>(order) + 1;
    Layout& full = layouts_[0];
    full.where.resize(static_cast<std::size_t>(n_series));
    for (std::size_t s = 0; s < full.where.size(); ++s) full.where[s] = static_cast<int>(s * stride_);
    full.record = static_cast<std::size_t>(n_series) * stride_;
    per_chunk_ = std::max<std::size_t>(16, kChunkDoubles / (2 + full.record));
}

Trajectory::~Trajectory() {
    for (auto& c : chunks_) {
        if (pool.doubles + c.size() > kPoolDoubles) break;
        pool.doubles += c.size();
        pool.free.push_back(std::move(c));
    }
}

void Trajectory::set_compact(int n_states, std::vector<double> a, std::vector<char> affine,
                             std::vector<double> weights, std::vector<double> offsets, std::size_t full_bytes) {
    if (size_ != 0) throw std::logic_error("Trajectory::set_compact after append");
    const std::size_t ns = static_cast<std::size_t>(n_states);
    const std::size_t no = static_cast<std::size_t>(n_series_) - ns;
    if (n_states < 1 || n_states > n_series_ || affine.size() != no || weights.size() != no * ns ||
        offsets.size() != no || !(a.empty() || a.size() == ns * ns))
        throw std::invalid_argument("Trajectory::set_compact: bad shape");
    if (order_ > kMaxBufferedOrder) return;  // no buffer for derived polynomials: keep everything
    n_states_ = n_states;
    full_bytes_ = full_bytes;
    linear_ = !a.empty() && ns * stride_ <= kMaxRegenerated && order_ >= 1;
    a_ = std::move(a);
    derived_ = std::move(affine);
    w_ = std::move(weights);
    d_ = std::move(offsets);
    inv_.assign(stride_ + 1, 0.0);
    for (std::size_t n = 1; n <= stride_; ++n) inv_[n] = 1.0 / static_cast<double>(n);
    // Full layout: every state, and the outputs that are not derived; compact layout (linear models): x[0] and
    // x[1] of the states, then the same outputs.
    for (int l = 0; l < 2; ++l) {
        Layout& lay = layouts_[l];
        const bool compact = l == 1;
        if (compact && !linear_) break;
        lay.where.assign(static_cast<std::size_t>(n_series_), -1);
        std::size_t off = compact ? 2 * ns : 0;
        for (std::size_t s = 0; s < lay.where.size(); ++s) {
            const bool derived = s < ns ? compact : derived_[s - ns] != 0;
            if (!derived) {
                lay.where[s] = static_cast<int>(off);
                off += stride_;
            }
        }
        lay.record = off;
    }
    terms_start_.assign(1, 0);
    term_state_.clear();
    term_weight_.clear();
    for (std::size_t j = 0; j < no; ++j) {
        for (std::size_t q = 0; q < ns; ++q)
            if (w_[j * ns + q] != 0.0) {
                term_state_.push_back(q);
                term_weight_.push_back(w_[j * ns + q]);
            }
        terms_start_.push_back(term_state_.size());
    }
    per_chunk_ = std::max<std::size_t>(16, kChunkDoubles / (2 + layouts_[0].record));
}

std::size_t Trajectory::bytes_per_step() const { return sizeof(double) * (2 + layouts_[linear_ ? 1 : 0].record); }

double* Trajectory::new_chunk() {
    // Full records while the full chunks stay under full_bytes_, compact ones after that (linear models).
    const std::uint8_t layout = linear_ && full_doubles_ * sizeof(double) >= full_bytes_ ? 1 : 0;
    const std::size_t need = per_chunk_ * (2 + layouts_[layout].record);
    if (layout == 0) full_doubles_ += need;
    std::vector<double> c;
    for (std::size_t i = pool.free.size(); i-- > 0;)
        if (pool.free[i].size() >= need) {
            c = std::move(pool.free[i]);
            pool.doubles -= c.size();
            pool.free.erase(pool.free.begin() + static_cast<std::ptrdiff_t>(i));
            break;
        }
    c.resize(need);
    chunks_.push_back(std::move(c));
    chunk_layout_.push_back(layout);
    return chunks_.back().data();
}

void Trajectory::append(double t0, double h, std::span<const double> coeffs) {
    if (coeffs.size() != stride_ * static_cast<std::size_t>(n_series_))
        throw std::invalid_argument("Trajectory::append: wrong number of coefficients");
    if (!(h > 0.0)) throw std::invalid_argument("Trajectory::append: step length must be positive");
    const std::size_t i = size_ % per_chunk_;
    double* c = i == 0 ? new_chunk() : chunks_.back().data();
    if (i == 0) chunk_start_.push_back(t0);
    const std::uint8_t l = chunk_layout_.back();
    const Layout& lay = layouts_[l];
    c[i] = t0;
    c[per_chunk_ + i] = h;
    double* rec = c + 2 * per_chunk_ + i * lay.record;
    if (l == 1) {
        const std::size_t ns = static_cast<std::size_t>(n_states_);
        for (std::size_t s = 0; s < ns; ++s) {
            rec[s] = coeffs[s * stride_];
            rec[ns + s] = coeffs[s * stride_ + 1];
        }
    }
    for (std::size_t s = 0; s < lay.where.size(); ++s)
        if (lay.where[s] >= 0) std::copy_n(coeffs.data() + s * stride_, stride_, rec + lay.where[s]);
    ++size_;
}

void Trajectory::regenerate(const double* rec, double* x) const {
    const std::size_t ns = static_cast<std::size_t>(n_states_);
    for (std::size_t s = 0; s < ns; ++s) {
        x[s * stride_] = rec[s];
        x[s * stride_ + 1] = rec[ns + s];
    }
    // The engine's recurrence (taylor/series.cpp, linear executor), term for term.
    for (std::size_t n = 1; n + 1 < stride_; ++n) {
        const double inv = inv_[n + 1];
        for (std::size_t s = 0; s < ns; ++s) {
            const double* a = a_.data() + s * ns;
            double f = 0.0;
            for (std::size_t j = 0; j < ns; ++j) f += a[j] * x[j * stride_ + n];
            x[s * stride_ + n + 1] = f * inv;
        }
    }
}

std::span<const double> Trajectory::poly(std::size_t k, int series, PolyBuffer& buf) const {
    const std::size_t s = static_cast<std::size_t>(series);
    const std::size_t c = k / per_chunk_;
    const bool compact = chunk_layout_[c] == 1;
    const Layout& lay = layouts_[compact ? 1 : 0];
    const double* rec = chunks_[c].data() + 2 * per_chunk_ + (k % per_chunk_) * lay.record;
    if (lay.where[s] >= 0) return {rec + lay.where[s], stride_};
    const std::size_t ns = static_cast<std::size_t>(n_states_);
    double states[kMaxRegenerated];
    if (compact) regenerate(rec, states);
    if (s < ns) {
        std::copy_n(states + s * stride_, stride_, buf.data());
        return {buf.data(), stride_};
    }
    // Affine output: y[n] = W·x[n] (+ d at n = 0), as the engine forms it (terms with a zero weight add
    // nothing and are skipped: an output is usually one amount over a volume).
    const std::size_t j = s - ns;
    std::fill_n(buf.data(), stride_, 0.0);
    buf[0] = d_[j];
    for (std::size_t t = terms_start_[j]; t < terms_start_[j + 1]; ++t) {
        const std::size_t q = term_state_[t];
        const double w = term_weight_[t];
        const double* x = compact ? states + q * stride_ : rec + lay.where[q];
        for (std::size_t n = 0; n < stride_; ++n) buf[n] += w * x[n];
    }
    return {buf.data(), stride_};
}

std::size_t Trajectory::step_at(double t) const {
    if (size_ == 0) throw std::out_of_range("Trajectory is empty");
    auto it = std::upper_bound(chunk_start_.begin(), chunk_start_.end(), t);
    if (it == chunk_start_.begin()) return 0;
    const std::size_t c = static_cast<std::size_t>(it - chunk_start_.begin()) - 1;
    const std::size_t first = c * per_chunk_;
    const std::size_t n = std::min(per_chunk_, size_ - first);
    const double* t0 = chunks_[c].data();
    const double* in = std::upper_bound(t0, t0 + n, t);
    return first + static_cast<std::size_t>(in - t0) - 1;
}

double Trajectory::value(int series, double t) const {
    const std::size_t k = step_at(t);
    PolyBuffer buf;
    return horner(poly(k, series, buf), t - step_start(k));
}

double Trajectory::left_limit(int series, double t) const {
    std::size_t k = step_at(t);
    if (k > 0 && t <= step_start(k)) --k;  // t is a step boundary: take the step that ends there
    PolyBuffer buf;
    return horner(poly(k, series, buf), t - step_start(k));
}

double Trajectory::derivative(int series, double t) const {
    const std::size_t k = step_at(t);
    PolyBuffer buf;
    return horner_derivative(poly(k, series, buf), t - step_start(k));
}

double Trajectory::integral(int series, double a, double b) const {
    if (size_ == 0) return 0.0;
    double sign = 1.0;
    if (b < a) { std::swap(a, b); sign = -1.0; }
    a = std::max(a, start());
    b = std::min(b, end());
    if (!(b > a)) return 0.0;
    double sum = 0.0;
    PolyBuffer buf;
    for (std::size_t k = step_at(a); k < size_ && step_start(k) < b; ++k) {
        const double t0 = step_start(k);
        const double lo = std::max(a, t0) - t0;
        const double hi = std::min(b, t0 + step_length(k)) - t0;
        if (hi <= lo) continue;
        auto p = poly(k, series, buf);
        sum += integral_from_zero(p, hi) - (lo > 0.0 ? integral_from_zero(p, lo) : 0.0);
    }
    return sign * sum;
}

namespace {
template <class F>
std::vector<double> collect(const Trajectory& tr, double a, double b, F&& per_step) {
    std::vector<double> out;
    if (tr.empty() || !(b > a)) return out;
    for (std::size_t k = tr.step_at(a); k < tr.size() && tr.step_start(k) < b; ++k) {
        const double t0 = tr.step_start(k);
        for (double tau : per_step(k)) {
            const double t = t0 + tau;
            if (t > a && t < b) out.push_back(t);
        }
    }
    std::sort(out.begin(), out.end());
    return out;
}
}  // namespace

std::vector<double> Trajectory::level_roots(int series, double level, double a, double b) const {
    std::vector<double> r;
    if (empty() || !(b > a)) return r;
    // One walk, each step's polynomial fetched once: its interior roots, and the boundary it starts at against
    // the previous step's end.
    PolyBuffer bufs[2];
    std::span<const double> prev;
    double prev_t0 = 0.0;
    int which = 0;
    for (std::size_t k = step_at(a); k < size_ && step_start(k) < b; ++k) {
        const double t0 = step_start(k);
        const std::span<const double> p = poly(k, series, bufs[which]);
        which ^= 1;
        for (double tau : roots_in(p, level, step_length(k))) {
            const double t = t0 + tau;
            if (t > a && t < b) r.push_back(t);
        }
        // A root on a boundary where the series is continuous belongs to the step that starts there.
        if (t0 > a && !prev.empty()) {
            const double before = horner(prev, t0 - prev_t0) - level;
            const double after = p[0] - level;
            const double scale = std::abs(level) + std::abs(before) + std::abs(after);
            const bool continuous = std::abs(before - after) <= 1e-12 * std::max(scale, 1e-300);
            if (continuous && (after == 0.0 || (before < 0) != (after < 0) || std::abs(after) <= 4e-16 * scale))
                r.push_back(t0);
        }
        prev = p;
        prev_t0 = t0;
    }
    std::sort(r.begin(), r.end());
    r.erase(std::unique(r.begin(), r.end(), [](double x, double y) { return y - x <= 1e-12 * std::max(1.0, std::abs(y)); }),
            r.end());
    return r;
}

std::vector<double> Trajectory::critical_points(int series, double a, double b) const {
    PolyBuffer buf;
    return collect(*this, a, b, [&](std::size_t k) { return critical_points_in(poly(k, series, buf), step_length(k)); });
}

std::vector<double> Trajectory::boundaries(double a, double b) const {
    std::vector<double> out;
    if (size_ == 0) return out;
    for (std::size_t k = step_at(a); k < size_; ++k) {
        const double t0 = step_start(k);
        if (t0 >= b) break;
        if (t0 > a) out.push_back(t0);
    }
    return out;
}

}  // namespace plateau::traj
