// One process (built without MPI): rank 0 of 1.  Nothing is ever sent or received.
#include <stdexcept>

#include "tools/knockon/ranks.hpp"

namespace knockon::cli {

void start_ranks(int&, char**&) {}
void end_ranks() {}
int rank() { return 0; }
int rank_count() { return 1; }
void fail_all_ranks(int, const std::string&, const std::string&) {}
void check_other_ranks(const std::string&) {}
void send_to_rank0(std::vector<std::string>&) {
    throw std::logic_error("send_to_rank0: this build runs in one process");
}
void receive_from_rank(int, const std::string&, const std::function<void(std::string&&)>&) {
    throw std::logic_error("receive_from_rank: this build runs in one process");
}

}  // namespace knockon::cli
