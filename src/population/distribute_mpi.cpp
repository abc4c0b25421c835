// The MPI side of population/distribute.hpp: the only file that includes <mpi.h>, compiled only with
// -DPLATEAU_MPI=ON. Each process runs its interleaved share; process 0 collects the other shares point to point
// (sizes as 64-bit counts, sent in pieces under MPI's int limit), so the result on process 0 is the one a single
// process computes, bit for bit: every value travels as its bytes.
#include <mpi.h>

#include <chrono>
#include <climits>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <stdexcept>
#include <string>

#include "population/distribute.hpp"

namespace plateau::population {

namespace {

constexpr int kTagSize = 1, kTagData = 2;
constexpr std::size_t kPiece = std::size_t{1} << 30;   // bytes per message, under MPI's int count

struct Packer {
    std::vector<char> bytes;
    template <class T>
    void put(const T& v) {
        const char* p = reinterpret_cast<const char*>(&v);
        bytes.insert(bytes.end(), p, p + sizeof(T));
    }
    template <class T>
    void put_all(const std::vector<T>& v) {
        put(static_cast<std::uint64_t>(v.size()));
        const char* p = reinterpret_cast<const char*>(v.data());
        bytes.insert(bytes.end(), p, p + v.size() * sizeof(T));
    }
};

struct Unpacker {
    const std::vector<char>& bytes;
    std::size_t at = 0;
    void need(std::size_t n) const {
        if (at + n > bytes.size()) throw std::runtime_error("MPI: a process sent a truncated share of the population");
    }
    template <class T>
    T get() {
        need(sizeof(T));
        T v;
        std::memcpy(&v, bytes.data() + at, sizeof(T));
        at += sizeof(T);
        return v;
    }
    template <class T>
    std::vector<T> get_all() {
        const auto n = static_cast<std::size_t>(get<std::uint64_t>());
        need(n * sizeof(T));
        std::vector<T> v(n);
        if (n > 0) std::memcpy(v.data(), bytes.data() + at, n * sizeof(T));
        at += n * sizeof(T);
        return v;
    }
};

// Everything one subject contributes: its draws and, per regimen, its figures and band row.
void pack(Packer& p, const Result& r, std::size_t i, std::size_t band_points) {
    const Subject& s = r.subjects[i];
    p.put_all(s.covariates);
    p.put_all(s.eta);
    p.put(static_cast<std::uint64_t>(s.parameters.size()));
    for (const auto& v : s.parameters) p.put_all(v);
    p.put_all(s.weight_kg);
    for (std::size_t g = 0; g < r.figures.size(); ++g) {
        const Figures& f = r.figures[g][i];
        p.put(f.status);
        for (double v : {f.first_peak, f.ss_peak, f.ss_trough, f.ss_average, f.ss_auc24, f.above_pct, f.first_reached, f.level})
            p.put(v);
        p.put_all(f.met);
        const float* band = r.bands[g].data() + i * band_points;
        p.bytes.insert(p.bytes.end(), reinterpret_cast<const char*>(band), reinterpret_cast<const char*>(band + band_points));
    }
}

void unpack(Unpacker& u, Result& r, std::size_t i, std::size_t band_points) {
    Subject& s = r.subjects[i];
    s.covariates = u.get_all<double>();
    s.eta = u.get_all<double>();
    s.parameters.resize(static_cast<std::size_t>(u.get<std::uint64_t>()));
    for (auto& v : s.parameters) v = u.get_all<double>();
    s.weight_kg = u.get_all<double>();
    for (std::size_t g = 0; g < r.figures.size(); ++g) {
        Figures& f = r.figures[g][i];
        f.status = u.get<Status>();
        for (double* v : {&f.first_peak, &f.ss_peak, &f.ss_trough, &f.ss_average, &f.ss_auc24, &f.above_pct, &f.first_reached, &f.level})
            *v = u.get<double>();
        f.met = u.get_all<signed char>();
        u.need(band_points * sizeof(float));
        std::memcpy(r.bands[g].data() + i * band_points, u.bytes.data() + u.at, band_points * sizeof(float));
        u.at += band_points * sizeof(float);
    }
}

void send_bytes(const std::vector<char>& bytes, int to) {
    const std::uint64_t n = bytes.size();
    MPI_Send(&n, 1, MPI_UINT64_T, to, kTagSize, MPI_COMM_WORLD);
    for (std::size_t at = 0; at < bytes.size(); at += kPiece)
        MPI_Send(bytes.data() + at, static_cast<int>(std::min(kPiece, bytes.size() - at)), MPI_BYTE, to, kTagData, MPI_COMM_WORLD);
}

std::vector<char> receive_bytes(int from) {
    std::uint64_t n = 0;
    MPI_Recv(&n, 1, MPI_UINT64_T, from, kTagSize, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
    std::vector<char> bytes(static_cast<std::size_t>(n));
    for (std::size_t at = 0; at < bytes.size(); at += kPiece)
        MPI_Recv(bytes.data() + at, static_cast<int>(std::min(kPiece, bytes.size() - at)), MPI_BYTE, from, kTagData,
                 MPI_COMM_WORLD, MPI_STATUS_IGNORE);
    return bytes;
}

// The first failing process's message, on every process, thrown as the same kind of exception.
void share_failure(std::exception_ptr error) {
    const Place p = place();
    int mine = error ? p.rank : INT_MAX, first = INT_MAX;
    MPI_Allreduce(&mine, &first, 1, MPI_INT, MPI_MIN, MPI_COMM_WORLD);
    if (first == INT_MAX) return;
    int kind = 2;
    std::string what;
    if (p.rank == first) {
        try {
            std::rethrow_exception(error);
        } catch (const std::invalid_argument& e) {
            kind = 0, what = e.what();
        } catch (const std::runtime_error& e) {
            kind = 1, what = e.what();
        } catch (const std::exception& e) {
            what = e.what();
        }
    }
    int length = static_cast<int>(what.size());
    MPI_Bcast(&kind, 1, MPI_INT, first, MPI_COMM_WORLD);
    MPI_Bcast(&length, 1, MPI_INT, first, MPI_COMM_WORLD);
    what.resize(static_cast<std::size_t>(length));
    MPI_Bcast(what.data(), length, MPI_CHAR, first, MPI_COMM_WORLD);
    if (kind == 0) throw std::invalid_argument(what);
    if (kind == 1) throw std::runtime_error(what);
    throw std::logic_error(what);
}

double seconds_since(std::chrono::steady_clock::time_point t) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t).count();
}

// PLATEAU_MPI_TIMES=1: each process's compute time and process 0's gather time on standard error (for bench/).
void report_times(const Place& p, double compute, double gather, std::size_t subjects) {
    if (const char* t = std::getenv("PLATEAU_MPI_TIMES"); t == nullptr || std::strcmp(t, "1") != 0) return;
    std::vector<double> all(static_cast<std::size_t>(p.ranks));
    MPI_Gather(&compute, 1, MPI_DOUBLE, all.data(), 1, MPI_DOUBLE, 0, MPI_COMM_WORLD);
    if (p.rank != 0) return;
    for (int k = 0; k < p.ranks; ++k) std::fprintf(stderr, "mpi-times: rank %d compute %.6f s\n", k, all[static_cast<std::size_t>(k)]);
    std::fprintf(stderr, "mpi-times: gather %.6f s for %zu subjects\n", gather, subjects);
}

}  // namespace

void start_processes(int* argc, char*** argv) {
    int provided = 0;   // only the main thread of each process calls MPI
    MPI_Init_thread(argc, argv, MPI_THREAD_FUNNELED, &provided);
}

void stop_processes() { MPI_Finalize(); }

Place place() {
    Place p;
    MPI_Comm_rank(MPI_COMM_WORLD, &p.rank);
    MPI_Comm_size(MPI_COMM_WORLD, &p.ranks);
    return p;
}

Result run_shared(const std::vector<regimen::Regimen>& regimens, const Setup& setup) {
    const Place p = place();
    if (p.ranks == 1) return run(regimens, setup);
    Setup mine = setup;
    mine.first = static_cast<std::size_t>(p.rank);
    mine.stride = static_cast<std::size_t>(p.ranks);
    const auto start = std::chrono::steady_clock::now();
    Result result;
    std::exception_ptr error;
    try {
        result = run(regimens, mine);
    } catch (...) {
        error = std::current_exception();
    }
    share_failure(error);
    const double compute = seconds_since(start);
    const auto gather_start = std::chrono::steady_clock::now();
    const auto band_points = static_cast<std::size_t>(setup.band_points);
    if (p.rank != 0) {
        Packer pk;
        for (std::size_t i = mine.first; i < setup.size; i += mine.stride) pack(pk, result, i, band_points);
        send_bytes(pk.bytes, 0);
    } else {
        for (int from = 1; from < p.ranks; ++from) {
            const std::vector<char> bytes = receive_bytes(from);
            Unpacker u{bytes};
            for (auto i = static_cast<std::size_t>(from); i < setup.size; i += mine.stride) unpack(u, result, i, band_points);
            if (u.at != bytes.size()) throw std::runtime_error("MPI: a process sent more than its share of the population");
        }
    }
    report_times(p, compute, seconds_since(gather_start), setup.size);
    return result;
}

std::vector<double> rows_shared(std::size_t n, std::size_t width, const RowWork& work) {
    const Place p = place();
    std::vector<double> rows(n * width);
    if (p.ranks == 1) {
        work(0, 1, rows);
        return rows;
    }
    const auto first = static_cast<std::size_t>(p.rank), stride = static_cast<std::size_t>(p.ranks);
    const auto start = std::chrono::steady_clock::now();
    std::exception_ptr error;
    try {
        work(first, stride, rows);
    } catch (...) {
        error = std::current_exception();
    }
    share_failure(error);
    const double compute = seconds_since(start);
    const auto gather_start = std::chrono::steady_clock::now();
    if (p.rank != 0) {
        Packer pk;
        for (std::size_t i = first; i < n; i += stride)
            for (std::size_t k = 0; k < width; ++k) pk.put(rows[i * width + k]);
        send_bytes(pk.bytes, 0);
    } else {
        for (int from = 1; from < p.ranks; ++from) {
            const std::vector<char> bytes = receive_bytes(from);
            Unpacker u{bytes};
            for (auto i = static_cast<std::size_t>(from); i < n; i += stride)
                for (std::size_t k = 0; k < width; ++k) rows[i * width + k] = u.get<double>();
            if (u.at != bytes.size()) throw std::runtime_error("MPI: a process sent more than its share of the subjects");
        }
    }
    report_times(p, compute, seconds_since(gather_start), n);
    return rows;
}

int agree_exit_code(int code) {
    int worst = code;
    MPI_Allreduce(&code, &worst, 1, MPI_INT, MPI_MAX, MPI_COMM_WORLD);
    return worst;
}

}  // namespace plateau::population
