// Snapshots of a run, kept in memory up to a budget and spilled to a temporary folder beyond it
// (private to the filters module). Display fields may be stored in single precision.
#pragma once

#include <boost/filesystem/path.hpp>

#include <cstddef>
#include <string>
#include <vector>

namespace ember::bridge
{
class SnapshotCache
{
public:
  struct Array
  {
    std::string name;
    bool single_precision = false; ///< stored as float (display fields only)
    std::vector<double> values;
  };
  struct Frame
  {
    double time = 0.0; ///< [s]
    std::vector<Array> arrays;
    std::vector<std::pair<std::string, double>> scalars;
  };

  explicit SnapshotCache(std::size_t budget_bytes = std::size_t(1) << 30);
  ~SnapshotCache(); ///< removes the spill folder, if one was made
  SnapshotCache(const SnapshotCache&) = delete;
  SnapshotCache& operator=(const SnapshotCache&) = delete;

  void set_budget(std::size_t bytes) { budget_ = bytes; }
  /// Forget all frames (and delete spilled files).
  void clear();
  /// Keep a frame: in memory while the budget allows, else on disk.
  void add(const Frame& frame);
  std::size_t size() const { return entries_.size(); }
  double time(std::size_t k) const { return entries_[k].time; }
  /// Frame k, read back from memory or disk. Throws std::runtime_error if a spill file is gone.
  Frame get(std::size_t k) const;

  std::size_t bytes_in_memory() const { return in_memory_; }
  std::size_t frames_on_disk() const;
  /// The spill folder ("" until something spilled).
  std::string spill_folder() const { return folder_.string(); }

private:
  struct Entry
  {
    double time = 0.0;
    std::vector<char> blob;     ///< empty when spilled
    boost::filesystem::path file; ///< set when spilled
  };
  std::size_t budget_;
  std::size_t in_memory_ = 0;
  std::vector<Entry> entries_;
  boost::filesystem::path folder_;
};
} // namespace ember::bridge
