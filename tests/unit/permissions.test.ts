// The role → action map follows the role table in README.md row by row.
import { describe, expect, it } from "vitest";
import { ACTIONS, can, ROLE_NAMES, type Action, type Role } from "@/lib/permissions";

const table: Record<Role, Action[]> = {
  viewer: ["view"],
  shift_lead: ["view", "alert.respond", "note.add", "survey.record", "maintenance.plan"],
  engineer: ["view", "alert.respond", "note.add", "survey.record", "maintenance.plan", "limits.edit", "plant.edit", "equipment.edit", "check.record", "upload.add", "import.run", "audit.view", "survey.plan", "gateways.map"],
  admin: [...ACTIONS],
};

describe("permissions (README.md role table)", () => {
  for (const role of ROLE_NAMES) {
    for (const action of ACTIONS) {
      const expected = table[role].includes(action);
      it(`${role} ${expected ? "may" : "may not"} ${action}`, () => {
        expect(can(role, action)).toBe(expected);
      });
    }
  }
  it("nobody signed in may do anything", () => {
    for (const action of ACTIONS) expect(can(null, action)).toBe(false);
  });
  it("only admins manage people, on-call and devices", () => {
    const admins = ROLE_NAMES.filter((r) => can(r, "people.manage") || can(r, "devices.manage") || can(r, "oncall.manage"));
    expect(admins).toEqual(["admin"]);
  });
});
