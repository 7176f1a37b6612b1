// `strewn shapes`: the shape kinds found (built-in and plugins) with their parameters.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <nlohmann/json.hpp>

#include "commands/command.hpp"
#include "run_cli.hpp"

namespace strewn::cli {
namespace {

void print_shapes(std::ostream& out, const ShapeRegistry& shapes) {
  for (const ShapeKindInfo& k : shapes.kinds()) {
    const auto desc = nlohmann::json::parse(k.params_json, nullptr, false);
    // A renamed kind names its former name, still read for one release with a warning.
    const bool renamed = !desc.is_discarded() && desc.contains("former_kind") && desc["former_kind"].is_string();
    fmt::print(out, "{}{}: {}\n", k.name, renamed ? " (formerly " + desc["former_kind"].get<std::string>() + ")" : "",
               k.summary);
    if (desc.is_discarded() || !desc.contains("params")) continue;
    for (const auto& p : desc["params"]) {
      std::string extra;
      if (p.value("required", false)) extra = "required";
      else if (p.contains("default")) extra = "default " + p["default"].dump();
      else extra = "optional";
      if (p.contains("former") && p["former"].is_object() && p["former"].contains("name"))
        extra += "; formerly " + p["former"].value("name", "?");  // still read, with a warning
      fmt::print(out, "    {:<18} {:<12} {:<4} {} ({})\n", p.value("name", "?"), p.value("type", "?"),
                 p.value("unit", ""), p.value("description", ""), extra);
    }
    fmt::print(out, "    from {}\n", k.module_path);
  }
}

class ShapesCommand final : public Command {
 public:
  explicit ShapesCommand(CLI::App& parent) {
    app_ = parent.add_subcommand("shapes", "List the shape kinds found (built-in and plugins) with their parameters.\n"
                                           "Example: strewn shapes");
  }

  bool chosen() const override { return app_->parsed(); }

  int run(const CommandContext& c) const override {
    print_shapes(c.out, c.shapes);
    return kAllLimitsHold;
  }

 private:
  CLI::App* app_;
};

}  // namespace

std::unique_ptr<Command> make_shapes_command(CLI::App& app) { return std::make_unique<ShapesCommand>(app); }

}  // namespace strewn::cli
