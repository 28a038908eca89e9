#pragma once
// Block types by name. Each block's file pair provides a `register_...`
// function that adds its type here; builtin_blocks() calls them all once.
// The registry is built once and never changed afterwards, so it can be
// shared by threads.

#include <functional>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include "flowsheet/block_model.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::units {

using BlockFactory = std::function<std::unique_ptr<BlockModel>(MappingReader& parameters, const BlockSetup& setup)>;

struct BlockTypeInfo {
  std::string name;         // type name used in case files, snake_case
  std::string summary;      // one line, for `unchain blocks`
  BlockFactory create;
};

class BlockRegistry final : public BlockCatalogue {
 public:
  void add(BlockTypeInfo info);
  [[nodiscard]] const BlockTypeInfo* find(const std::string& name) const;
  [[nodiscard]] std::vector<std::string> type_names() const override;
  [[nodiscard]] std::unique_ptr<BlockModel> create(const std::string& type, MappingReader& parameters,
                                                   const BlockSetup& setup) const override;
  [[nodiscard]] const std::map<std::string, BlockTypeInfo>& all() const { return types_; }

 private:
  std::map<std::string, BlockTypeInfo> types_;
};

// Every block type unchain ships.
const BlockRegistry& builtin_blocks();

}  // namespace unchain::units
