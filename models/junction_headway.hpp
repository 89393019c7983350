#pragma once
// Headways of trains that share only part of their paths: a branch train merging behind a
// main-line train, one leaving the main line behind another, two trains crossing on a diamond.
// A line section's headways (models/plan, consecutive_headways) pair only trains that run over
// the whole line section, so such trains meet nowhere there; here they are paired where they meet.
//
// The rule, in full:
// - A junction section is a switch's or diamond's own detection section (ServicePaths::
//   node_sections) over which line sections of two or more corridors run: some train of each
//   blocks it between that line section's stations (stairway_in).  A line has one corridor, so
//   none of its sections is a junction section and it gets no junction pairs.
// - A train's corridors there are those of the line sections it blocks the junction section in.
// - Its users, every train blocking it, are ordered by the start of their blocking (then by
//   train index).  Each two consecutive users that share no corridor there and are not already
//   a consecutive pair of some line section are a junction pair, once for each (leader,
//   follower): named after the first of the junction sections where they are so along the
//   follower's path (where a branch train joins the main line, say, not a diamond beyond it).
// - The pair's minimum headway compares the two stairways over every section both block in the
//   order they meet at the junction (leader first; a section the follower blocks first belongs
//   to another meeting of the two, not to this one), as blocking time theory compares two trains
//   over the sections their routes share (minimum_headway).  Reference times are when each
//   head reaches the junction section, so the scheduled headway is the gap between the trains
//   arriving at the junction; the buffer (scheduled minus minimum) does not depend on that choice.
#include <vector>

#include "models/headway.hpp"
#include "models/line_section.hpp"
#include "models/train_plan.hpp"

namespace knockon {

// The junction pairs of a plan, ordered by when the follower's blocking of its junction section
// starts (then by leader and follower).  `node_sections` is ServicePaths::node_sections(), `line_pairs` the
// line sections' consecutive pairs (consecutive_headways).
std::vector<HeadwayPair> junction_headways(const std::vector<LineSection>& line_sections,
                                           const std::vector<bool>& node_sections,
                                           const std::vector<TrainPlan>& trains,
                                           const std::vector<HeadwayPair>& line_pairs);

}  // namespace knockon
