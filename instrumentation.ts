// Runs once when the app's server starts (Next's instrumentation hook): reads and checks the
// settings (lib/settings.ts), so an app without its secrets (outside the demo and the tests)
// stops at start with a list of what is missing instead of serving pages.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { getSettings, SettingsError } = await import("./lib/settings");
  try {
    getSettings();
  } catch (err) {
    if (err instanceof SettingsError) {
      console.error(err.message);
      process.exit(1);
    }
    throw err;
  }
}
