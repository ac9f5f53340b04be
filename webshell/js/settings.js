// The global pressure unit and the theme, remembered in localStorage. No clinical values here.

const KPA_REGIONS = new Set(["GB", "AU", "NZ", "IE", "ZA", "DE", "AT", "CH", "NL", "BE", "LU", "FR", "ES", "PT",
  "IT", "SE", "NO", "DK", "FI", "IS", "PL", "CZ", "SK", "HU", "SI", "HR", "EE", "LV", "LT", "GR", "CY", "MT"]);

export function localeUnit(languages = navigator.languages || [navigator.language]) {
  const tag = (languages && languages[0]) || "en-US";
  let region = "";
  try {
    region = new Intl.Locale(tag).maximize().region || "";
  } catch {
    region = (tag.split("-")[1] || "").toUpperCase();
  }
  return KPA_REGIONS.has(region) ? "kPa" : "mmHg";
}

class Settings extends EventTarget {
  constructor() {
    super();
    const stored = localStorage.getItem("tidewell:pressure-unit");
    this.pressureUnit = stored === "kPa" || stored === "mmHg" ? stored : localeUnit();
    const theme = localStorage.getItem("tidewell:theme");
    this.theme = ["light", "dark"].includes(theme) ? theme : "auto";
  }

  setPressureUnit(unit) {
    if (unit !== "kPa" && unit !== "mmHg") return;
    this.pressureUnit = unit;
    localStorage.setItem("tidewell:pressure-unit", unit);
    this.dispatchEvent(new Event("pressure"));
  }

  setTheme(theme) {
    this.theme = ["light", "dark"].includes(theme) ? theme : "auto";
    localStorage.setItem("tidewell:theme", this.theme);
    this.applyTheme();
  }

  applyTheme() {
    const dark = this.theme === "dark" || (this.theme === "auto" && matchMedia("(prefers-color-scheme: dark)").matches);
    document.documentElement.dataset.theme = dark ? "dark" : "light";
    const meta = document.querySelector('meta[name="theme-color"]');
    if (meta) meta.content = dark ? "#0b1416" : "#0f4c5c";
  }
}

export const settings = new Settings();
settings.applyTheme();
matchMedia("(prefers-color-scheme: dark)").addEventListener("change", () => settings.applyTheme());
