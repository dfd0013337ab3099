"""What the report needs from the scenario text stored in a result file.

The scenario YAML is read with PyYAML when it is installed (Debian: python3-yaml) and otherwise
with a small indentation-based reader that understands nested `key: value` mappings only, which
is all this module looks at. Nothing here guesses a physical value: a quantity that cannot be
found, or whose unit is not understood, is returned as None and the caller says so.
"""

from pathlib import Path
import re

try:
    import yaml as _yaml  # PyYAML, optional
except ImportError:  # pragma: no cover - depends on the machine
    _yaml = None

# Unit suffixes accepted on the planet quantities, as factors to SI.
_LENGTH_UNITS = {"m": 1.0, "km": 1.0e3}
_GM_UNITS = {"m^3/s^2": 1.0, "m3/s2": 1.0, "km^3/s^2": 1.0e9, "km3/s2": 1.0e9}
_RATE_UNITS = {"rad/s": 1.0, "1/s": 1.0}

# The planet keys of config/scenario_keys.yaml (the scenario as run has the planet inline).
_RADIUS_KEYS = ("equatorial_radius",)
_GM_KEYS = ("gm",)
_OMEGA_KEYS = ("spin_rate",)


def _scalar(text):
    """A YAML scalar as str/int/float/bool/None (the small reader's share of YAML's rules)."""
    t = text.strip()
    if len(t) >= 2 and t[0] == t[-1] and t[0] in "'\"":
        return t[1:-1]
    if t in ("", "~", "null", "Null", "NULL"):
        return None
    if t in ("true", "True", "TRUE"):
        return True
    if t in ("false", "False", "FALSE"):
        return False
    try:
        return int(t)
    except ValueError:
        pass
    try:
        return float(t)
    except ValueError:
        return t


def _strip_comment(line):
    """Drop a `#` comment that is not inside quotes."""
    quote = None
    for i, c in enumerate(line):
        if quote:
            if c == quote:
                quote = None
        elif c in "'\"":
            quote = c
        elif c == "#" and (i == 0 or line[i - 1].isspace()):
            return line[:i]
    return line


def parse_simple_yaml(text):
    """Nested `key: value` mappings from YAML text; list items and flow collections are skipped.

    Enough to find `name` and the planet's fields when PyYAML is not installed.
    """
    root = {}
    stack = [(-1, root)]  # (indent of the mapping's keys' parent line, mapping)
    skip_deeper_than = None  # indentation of a list item whose block is being skipped
    for raw in text.splitlines():
        line = _strip_comment(raw).rstrip()
        if not line.strip() or line.strip() in ("---", "..."):
            continue
        indent = len(line) - len(line.lstrip(" "))
        body = line.strip()
        if skip_deeper_than is not None:
            if indent > skip_deeper_than:
                continue
            skip_deeper_than = None
        if body.startswith("- ") or body == "-":
            skip_deeper_than = indent
            continue
        m = re.match(r"^([^:]+?)\s*:(\s+(.*))?$", body)
        if not m:
            continue
        key = str(_scalar(m.group(1)))
        value = m.group(3)
        while stack and indent <= stack[-1][0]:
            stack.pop()
        parent = stack[-1][1] if stack else root
        if value is None or value == "":
            child = {}
            parent[key] = child
            stack.append((indent, child))
        elif value.startswith(("[", "{", "|", ">")):
            parent[key] = None  # flow collections and block scalars are not needed here
        else:
            parent[key] = _scalar(value)
    return root


def load_yaml_text(text, use_pyyaml=True):
    """The scenario as nested dicts (PyYAML if available and wanted, else the small reader)."""
    if use_pyyaml and _yaml is not None:
        try:
            data = _yaml.safe_load(text)
            return data if isinstance(data, dict) else {}
        except _yaml.YAMLError:
            pass  # fall through to the small reader, which tolerates more
    return parse_simple_yaml(text)


def quantity_si(value, units):
    """A number, or "number unit" with a unit from `units`, in SI; None if not understood."""
    if isinstance(value, bool) or value is None:
        return None
    if isinstance(value, (int, float)):
        return float(value)
    m = re.match(r"^\s*([-+0-9.eE]+)\s*(\S+)?\s*$", str(value))
    if not m:
        return None
    try:
        number = float(m.group(1))
    except ValueError:
        return None
    unit = m.group(2)
    if unit is None:
        return number
    return number * units[unit] if unit in units else None


def _find_key(tree, key):
    """Depth-first search for the first mapping entry named `key`."""
    if isinstance(tree, dict):
        if key in tree:
            return tree[key]
        for v in tree.values():
            found = _find_key(v, key)
            if found is not None:
                return found
    return None


def _first(mapping, keys, units):
    for k in keys:
        if isinstance(mapping, dict) and k in mapping:
            q = quantity_si(mapping[k], units)
            if q is not None:
                return q
    return None


def _planet_from_config(name, config_dir, use_pyyaml):
    """A planet given by name, looked up in config/planets.yaml beside this folder if present."""
    path = Path(config_dir) / "planets.yaml"
    if not path.is_file():
        return None
    data = load_yaml_text(path.read_text(encoding="utf-8", errors="replace"), use_pyyaml)
    for table in (data, data.get("planets") if isinstance(data, dict) else None):
        if isinstance(table, dict):
            for k, v in table.items():
                if str(k).lower() == str(name).lower() and isinstance(v, dict):
                    return v
    return None


class ScenarioInfo:
    """Name and planet constants from a scenario, each with where it came from."""

    def __init__(self):
        self.name = None  # str or None
        self.planet_name = None  # str or None
        self.equatorial_radius_m = None  # m, or None when not found
        self.gm_m3_s2 = None  # m^3/s^2, or None
        self.omega_rad_s = None  # rad/s, or None
        self.source = "scenario"  # where the planet constants were found

    def geostationary_radius_m(self):
        """r_g = (GM / Omega^2)^(1/3) (physics.md section 1), or None without both constants."""
        if self.gm_m3_s2 and self.omega_rad_s:
            return (self.gm_m3_s2 / self.omega_rad_s**2) ** (1.0 / 3.0)
        return None


def scenario_info(text, config_dir=None, use_pyyaml=True):
    """Read the scenario's name and planet constants from its YAML text."""
    info = ScenarioInfo()
    if not text:
        return info
    tree = load_yaml_text(text, use_pyyaml)
    for key in ("name", "title"):
        if isinstance(tree.get(key), (str, int, float)):
            info.name = str(tree[key])
            break
    planet = _find_key(tree, "planet")
    if isinstance(planet, str):
        info.planet_name = planet
        if config_dir is None:
            config_dir = Path(__file__).resolve().parent.parent / "config"
        planet = _planet_from_config(planet, config_dir, use_pyyaml)
        info.source = "config/planets.yaml"
    if isinstance(planet, dict):
        if info.planet_name is None and isinstance(planet.get("name"), str):
            info.planet_name = planet["name"]
        info.equatorial_radius_m = _first(planet, _RADIUS_KEYS, _LENGTH_UNITS)
        info.gm_m3_s2 = _first(planet, _GM_KEYS, _GM_UNITS)
        info.omega_rad_s = _first(planet, _OMEGA_KEYS, _RATE_UNITS)
    return info
