"use client";

import dynamic from "next/dynamic";

// The "Log" button's forms: a bin page draws at most the one asked for (?log=…), so each loads on
// its own, and a page with none open loads none.
export const FeedingForm = dynamic(() => import("./feeding-form").then((m) => m.FeedingForm));
export const WaterForm = dynamic(() => import("./water-form").then((m) => m.WaterForm));
export const ShiftForm = dynamic(() => import("./shift-form").then((m) => m.ShiftForm));
export const HarvestForm = dynamic(() => import("./harvest-form").then((m) => m.HarvestForm));
export const SampleForm = dynamic(() => import("./sample-form").then((m) => m.SampleForm));
export const NoteForm = dynamic(() => import("./note-form").then((m) => m.NoteForm));
