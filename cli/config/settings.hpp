// Connection settings: which pbfleetd to talk to and with which token.
//
// Sources, later overriding earlier: the config file
// ($XDG_CONFIG_HOME/pbfleet/config, default ~/.config/pbfleet/config),
// the environment (PBFLEET_URL, PBFLEET_TOKEN), then flags (--server,
// --token-file). The token is never taken as a plain flag value (it would
// show in process lists) and never printed back.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>

#include "cli/io.hpp"
#include "models/result.hpp"

namespace pbfleet::cli::config {

// Where pbfleetd listens by default (deploy/pbfleetd.conf.example).
inline constexpr std::string_view kDefaultServerUrl = "http://127.0.0.1:8470";

// What one source says; unset fields leave the earlier source in force.
struct Layer {
  std::optional<std::string> server_url;
  std::optional<std::string> token;
};

struct Settings {
  std::string server_url{kDefaultServerUrl};
  std::string token;               // empty = none
  std::string server_from = "default";  // "config file", "PBFLEET_URL", "--server"
  std::string token_from = "none";      // never the token itself
};

// $XDG_CONFIG_HOME/pbfleet/config, or $HOME/.config/pbfleet/config.
// Error when neither variable is set.
models::Result<std::filesystem::path> config_path(const Io& io);

// Parses "key = value" lines (keys: server, token); '#' starts a comment.
// Error names the line and the unknown key or missing '='.
models::Result<Layer> parse_config(std::string_view text);
// Writes the layer in the same format (what store_config saves).
std::string format_config(const Layer& layer);

// Reads the config file; an absent file is an empty layer.
models::Result<Layer> load_config(const std::filesystem::path& path);
// Saves atomically (temporary file, then rename), file mode 0600, the
// directory created 0700 when missing.
models::Result<bool> store_config(const std::filesystem::path& path, const Layer& layer);

// PBFLEET_URL and PBFLEET_TOKEN.
Layer environment_layer(const Io& io);

// The first line of a token file, trimmed. Error when unreadable or empty.
models::Result<std::string> read_token_file(const std::filesystem::path& path);

// file < environment < flags.
Settings resolve(const Layer& file, const Layer& environment, const Layer& flags);

}  // namespace pbfleet::cli::config
