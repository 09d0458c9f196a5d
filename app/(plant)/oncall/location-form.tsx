"use client";
// The admin's form for the plant's location, which the outdoor forecast (tomorrow's dry air) is fetched for.
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import { savePlantLocation } from "./actions";

export function PlantLocationForm({ latitude, longitude }: { latitude: number | null; longitude: number | null }) {
  return (
    <ActionForm action={savePlantLocation} className="space-y-3" successMessage="Saved. The next forecast is fetched for this place (within the hour).">
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        <Field label="Latitude (°, north +)" name="latitude">
          <input name="latitude" inputMode="decimal" maxLength={30} className={inputClass} defaultValue={latitude ?? ""} placeholder="e.g. 52.6" />
        </Field>
        <Field label="Longitude (°, east +)" name="longitude">
          <input name="longitude" inputMode="decimal" maxLength={30} className={inputClass} defaultValue={longitude ?? ""} placeholder="e.g. 0.4" />
        </Field>
      </div>
      <SubmitButton variant="quiet">Save location</SubmitButton>
    </ActionForm>
  );
}
