// Device secrets sealed for a broker that keeps its own credentials (lib/device-secrets.ts), and
// the settings that the Mosquitto profile needs (lib/settings.ts).
import { describe, expect, it } from "vitest";
import { hashDeviceSecret, unsealDeviceSecret, verifyDeviceSecret } from "../../../lib/device-secrets";
import { parseSettings, SettingsError } from "../../../lib/settings";

const KEY = "seal-key-for-the-unit-test-0123456789";

describe("sealed device secrets", () => {
  it("keep the salted hash that signs the device in, and open with the install's key only", () => {
    const stored = hashDeviceSecret("device-secret-abc", "0011aabb", KEY);
    expect(stored.split(":")).toHaveLength(4);
    expect(verifyDeviceSecret("device-secret-abc", stored)).toBe(true);
    expect(verifyDeviceSecret("device-secret-abd", stored)).toBe(false);
    expect(unsealDeviceSecret(stored, KEY)).toBe("device-secret-abc");
    expect(unsealDeviceSecret(stored, "another-key-0123456789")).toBeNull();
    expect(unsealDeviceSecret(stored.slice(0, -4) + "AAAA", KEY)).toBeNull(); // tampered: GCM refuses it
  });

  it("without a key store the hash alone, as before, and nothing can be opened", () => {
    const stored = hashDeviceSecret("device-secret-abc", "0011aabb", null);
    expect(stored.split(":")).toHaveLength(3);
    expect(verifyDeviceSecret("device-secret-abc", stored)).toBe(true);
    expect(unsealDeviceSecret(stored, KEY)).toBeNull();
  });
});

describe("Mosquitto profile settings", () => {
  const production = {
    STILLFIELD_MODE: "production",
    NEXTAUTH_SECRET: "a".repeat(32),
    DB_PASSWORD: "b".repeat(32),
    MQTT_WORKER_PASSWORD: "c".repeat(32),
    MQTT_APP_PASSWORD: "d".repeat(32),
  };
  it("refuse BROKER=mosquitto in production without the plugin admin's password", () => {
    expect(() => parseSettings({ ...production, BROKER: "mosquitto" })).toThrow(SettingsError);
    expect(parseSettings({ ...production, BROKER: "mosquitto", MQTT_ADMIN_PASSWORD: "e".repeat(32) }).BROKER).toBe("mosquitto");
  });
  it("default to the embedded broker, one worker and the local alerts engine", () => {
    const s = parseSettings(production);
    expect([s.BROKER, s.WORKERS, s.ALERTS_OWNER, s.ALERTS_LEASE_TTL_MS]).toEqual(["embedded", 1, "local", 10_000]);
  });
});
