#include "job.hpp"

namespace tamis::workbench {

bool run_to_end(Job& job, size_t budget) {
  while (!job.step(budget)) {
  }
  return !job.error() && !job.cancelled();
}

}  // namespace tamis::workbench
