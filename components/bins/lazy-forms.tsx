"use client";

import dynamic from "next/dynamic";

// Forms shown to owners alone: their code (and the input checks they share with the server) loads
// only on a page that draws them, not for every keeper and viewer who opens Today or a bin.
export const AddBinForm = dynamic(() => import("./add-bin-form").then((m) => m.AddBinForm));
export const BinSizeForm = dynamic(() => import("./bin-size-form").then((m) => m.BinSizeForm));
