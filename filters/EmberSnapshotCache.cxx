#include "EmberSnapshotCache.h"

#include <boost/filesystem/operations.hpp>

#include <cstring>
#include <fstream>
#include <stdexcept>

namespace fs = boost::filesystem;

namespace ember::bridge
{
namespace
{
// A flat byte image of a frame; host byte order (the files never leave this process).
template <class T>
void put(std::vector<char>& out, const T& value)
{
  const char* p = reinterpret_cast<const char*>(&value);
  out.insert(out.end(), p, p + sizeof(T));
}

void put_string(std::vector<char>& out, const std::string& s)
{
  put(out, static_cast<std::uint64_t>(s.size()));
  out.insert(out.end(), s.begin(), s.end());
}

class Reader
{
public:
  explicit Reader(const std::vector<char>& in) : in_(in) {}
  template <class T>
  T get()
  {
    T value;
    check(sizeof(T));
    std::memcpy(&value, in_.data() + pos_, sizeof(T));
    pos_ += sizeof(T);
    return value;
  }
  std::string get_string()
  {
    const auto n = get<std::uint64_t>();
    check(n);
    std::string s(in_.data() + pos_, n);
    pos_ += n;
    return s;
  }

private:
  void check(std::size_t n) const
  {
    if (pos_ + n > in_.size())
      throw std::runtime_error("snapshot cache: a stored frame is truncated");
  }
  const std::vector<char>& in_;
  std::size_t pos_ = 0;
};

std::vector<char> encode(const SnapshotCache::Frame& frame)
{
  std::vector<char> out;
  put(out, frame.time);
  put(out, static_cast<std::uint64_t>(frame.arrays.size()));
  for (const auto& a : frame.arrays)
  {
    put_string(out, a.name);
    put(out, static_cast<std::uint8_t>(a.single_precision));
    put(out, static_cast<std::uint64_t>(a.values.size()));
    for (double v : a.values)
      a.single_precision ? put(out, static_cast<float>(v)) : put(out, v);
  }
  put(out, static_cast<std::uint64_t>(frame.scalars.size()));
  for (const auto& [name, value] : frame.scalars)
  {
    put_string(out, name);
    put(out, value);
  }
  return out;
}

SnapshotCache::Frame decode(const std::vector<char>& blob)
{
  Reader in(blob);
  SnapshotCache::Frame frame;
  frame.time = in.get<double>();
  frame.arrays.resize(in.get<std::uint64_t>());
  for (auto& a : frame.arrays)
  {
    a.name = in.get_string();
    a.single_precision = in.get<std::uint8_t>() != 0;
    a.values.resize(in.get<std::uint64_t>());
    for (double& v : a.values)
      v = a.single_precision ? in.get<float>() : in.get<double>();
  }
  const auto n_scalars = in.get<std::uint64_t>();
  for (std::uint64_t i = 0; i < n_scalars; ++i)
  {
    std::string name = in.get_string();
    frame.scalars.emplace_back(std::move(name), in.get<double>());
  }
  return frame;
}
} // namespace

SnapshotCache::SnapshotCache(std::size_t budget_bytes) : budget_(budget_bytes) {}

SnapshotCache::~SnapshotCache()
{
  boost::system::error_code ignored; // a destructor must not throw; a leftover temp is harmless
  if (!folder_.empty())
    fs::remove_all(folder_, ignored);
}

void SnapshotCache::clear()
{
  for (const Entry& e : entries_)
    if (!e.file.empty())
      fs::remove(e.file);
  entries_.clear();
  in_memory_ = 0;
}

void SnapshotCache::add(const Frame& frame)
{
  Entry entry;
  entry.time = frame.time;
  entry.blob = encode(frame);
  if (in_memory_ + entry.blob.size() > budget_)
  {
    if (folder_.empty())
    {
      folder_ = fs::temp_directory_path() / fs::unique_path("emberlith-snapshots-%%%%-%%%%-%%%%");
      fs::create_directories(folder_);
    }
    entry.file = folder_ / ("frame-" + std::to_string(entries_.size()) + ".bin");
    std::ofstream out(entry.file.string(), std::ios::binary);
    out.write(entry.blob.data(), static_cast<std::streamsize>(entry.blob.size()));
    if (!out)
      throw std::runtime_error("snapshot cache: cannot write " + entry.file.string() +
        " (disk full? raise the memory budget or free space in " + folder_.string() + ")");
    entry.blob.clear();
    entry.blob.shrink_to_fit();
  }
  else
    in_memory_ += entry.blob.size();
  entries_.push_back(std::move(entry));
}

SnapshotCache::Frame SnapshotCache::get(std::size_t k) const
{
  const Entry& e = entries_.at(k);
  if (e.file.empty())
    return decode(e.blob);
  std::ifstream in(e.file.string(), std::ios::binary);
  if (!in)
    throw std::runtime_error("snapshot cache: spilled frame " + e.file.string() + " is missing");
  std::vector<char> blob((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  return decode(blob);
}

std::size_t SnapshotCache::frames_on_disk() const
{
  std::size_t n = 0;
  for (const Entry& e : entries_)
    n += !e.file.empty();
  return n;
}
} // namespace ember::bridge
