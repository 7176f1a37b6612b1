#include "run_cli.hpp"

#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <cctype>
#include <cstdlib>
#include <iostream>
#include <ostream>
#include <sstream>
#include <unistd.h>

#include "commands/command.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

ShapeRegistry load_shapes(const std::vector<std::string>& plugin_dirs, std::ostream& err) {
  ShapeRegistry shapes = ShapeRegistry::with_default_search_path(plugin_dirs);
  for (const std::string& w : shapes.warnings()) fmt::print(err, "strewn: warning: {}\n", w);
  return shapes;
}

// CLI11's range checks print their bounds in fixed notation: DBL_MAX as 309 digits. Any run of
// more than 15 digits in a message is shown with 3 significant digits instead.
std::string short_numbers(const std::string& text) {
  std::string out;
  for (std::size_t i = 0; i < text.size();) {
    std::size_t j = i;
    while (j < text.size() && std::isdigit(static_cast<unsigned char>(text[j]))) ++j;
    std::size_t k = j;
    if (k < text.size() && text[k] == '.' && j > i) {
      ++k;
      while (k < text.size() && std::isdigit(static_cast<unsigned char>(text[k]))) ++k;
    }
    if (j - i > 15) {
      out += fmt::format("{:.3g}", std::strtod(text.substr(i, k - i).c_str(), nullptr));
      i = k;
    } else if (j > i) {
      out.append(text, i, j - i);
      i = j;
    } else {
      out += text[i++];
    }
  }
  return out;
}

}  // namespace

int run_cli(int argc, const char* const* argv, std::ostream& out, std::ostream& err) {
  return run_cli(argc, argv, out, err, nullptr);
}

int run_cli(int argc, const char* const* argv, std::ostream& out_stream, std::ostream& err_stream,
            const Distributor* distributor) {
  // The ranks of an mpirun job other than 0 say nothing: a message is printed once, not N times.
  std::ostream silent(nullptr);
  const bool speaks = gathers_results(distributor);
  std::ostream& out = speaks ? out_stream : silent;
  std::ostream& err = speaks ? err_stream : silent;
  CLI::App app{"strewn: how likely scattered impacts are to land in the zones of a site plan.\n"
               "Exit status: 0 all limits hold, 3 a limit is exceeded, 2 bad input, 1 internal error."};
  app.set_version_flag("--version", std::string("strewn ") + library_version());
  app.require_subcommand(1);
  std::vector<std::string> plugin_dirs;
  app.add_option("--plugin-dir", plugin_dirs, "Extra directory of shape plugins (repeatable)")
      ->allow_extra_args(false)  // one directory each time, so a FILE after it stays the command's
      ->check(CLI::ExistingDirectory);  // a misspelt one was passed over without a word
  // Options of the program as a whole (--plugin-dir) may also follow the command, as the README
  // writes them (`strewn assess FILE --plugin-dir DIR`); subcommands made after this inherit it.
  app.fallthrough();

  // Every subcommand from the one table (commands/commands.cpp), in the order --help lists them.
  const std::vector<std::unique_ptr<Command>> commands = make_commands(app);

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    out << app.help(e.get_exit_code() == 0 ? "" : "", CLI::AppFormatMode::Normal);
    return kAllLimitsHold;
  } catch (const CLI::CallForVersion&) {
    out << "strewn " << library_version() << "\n";
    return kAllLimitsHold;
  } catch (const CLI::ParseError& e) {
    std::ostringstream o, er;
    const int code = app.exit(e, o, er);
    out << o.str();
    if (code == 0) return kAllLimitsHold;
    // One line, as every other input error: the option and what is wrong, then where to look.
    std::string what = short_numbers(e.what());
    for (char& c : what)
      if (c == '\n') c = ' ';
    // A mistyped command ("asess") is an unknown word, not a missing command: name the nearest.
    std::vector<std::string> names;
    for (const CLI::App* sub : app.get_subcommands([](const CLI::App*) { return true; })) names.push_back(sub->get_name());
    const bool no_command = dynamic_cast<const CLI::RequiredError*>(&e) != nullptr ||
                            dynamic_cast<const CLI::ExtrasError*>(&e) != nullptr;
    for (int i = 1; no_command && i < argc; ++i) {
      const std::string word = argv[i];
      if (word.empty() || word[0] == '-') {
        if (word.rfind("--", 0) == 0 && word.find('=') == std::string::npos) ++i;  // its value
        continue;
      }
      if (std::find(names.begin(), names.end(), word) != names.end()) break;
      what = "unknown command '" + quoted_excerpt(word) + "'" + (word.size() <= 64 ? did_you_mean(word, names) : "");
      break;
    }
    // Within the command given: a mistyped option ("--metod") or a mistyped command under it
    // ("solve clearence"), named with the nearest of its own (they said "arguments were not
    // expected" and "A subcommand is required").
    const CLI::App* level = &app;
    std::string chain;
    for (std::vector<CLI::App*> chosen = app.get_subcommands(); !chosen.empty(); chosen = chosen.front()->get_subcommands()) {
      level = chosen.front();
      chain += (chain.empty() ? "" : " ") + level->get_name();
    }
    if (level != &app && dynamic_cast<const CLI::ExtrasError*>(&e) != nullptr) {
      std::vector<std::string> options;
      for (const CLI::App* a = level; a != nullptr; a = a->get_parent())
        for (const CLI::Option* o : a->get_options())
          for (const std::string& name : o->get_lnames()) options.push_back("--" + name);
      for (int i = 1; i < argc; ++i) {
        const std::string word = std::string(argv[i]).substr(0, std::string(argv[i]).find('='));
        if (word.rfind("--", 0) != 0 || word.size() <= 2 || std::find(options.begin(), options.end(), word) != options.end())
          continue;
        what = "unknown option '" + quoted_excerpt(word) + "' for 'strewn " + chain + "'" +
               (word.size() <= 64 ? did_you_mean(word, options) : "");
        break;
      }
    }
    if (level != &app && dynamic_cast<const CLI::RequiredError*>(&e) != nullptr) {
      std::vector<std::string> subs;
      for (const CLI::App* sub : level->get_subcommands([](const CLI::App*) { return true; })) subs.push_back(sub->get_name());
      const auto at = std::find_if(argv + 1, argv + argc, [&](const char* a) { return a == level->get_name(); });
      if (!subs.empty() && at + 1 < argv + argc && at[1][0] != '-') {
        const std::string word = at[1];
        what = "unknown command '" + quoted_excerpt(chain + " " + word) + "'" +
               (word.size() <= 64 ? did_you_mean(word, subs) : "");
      }
    }
    err << "strewn: error: " << what << " (strewn --help, or strewn COMMAND --help)\n";
    return kBadInput;
  }

  try {
    const ShapeRegistry shapes = load_shapes(plugin_dirs, err);
    const bool terminal = &err == &std::cerr && ::isatty(2) == 1;  // progress bars only on a terminal
    const CommandContext context{shapes, out, err, terminal, distributor};
    for (const auto& command : commands)
      if (command->chosen()) {
        if (!speaks && !command->distributed()) return kAllLimitsHold;  // rank 0 runs it alone
        return command->run(context);
      }
    return kBadInput;  // unreachable: the parser requires one subcommand
  } catch (const input_error& e) {
    fmt::print(err, "strewn: error: {}\n", e.what());
    return kBadInput;
  } catch (const std::exception& e) {
    fmt::print(err, "strewn: internal error: {}\n", e.what());
    return kInternalError;
  }
}

}  // namespace strewn::cli
