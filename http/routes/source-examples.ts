// Example bodies for the OpenAPI document: a source by place and time, and the moon. The places are invented.

export const profileExamples = {
  "evening-sun": {
    summary: "The sun for a moment and a place: an evening shower over an invented valley town (47.2° N, 8.4° E)",
    value: { sun: { at: { utc: "2026-06-21T18:30:00Z", latitudeDeg: 47.2, longitudeDeg: 8.4, heightM: 450 } } },
  },
  "full-moon": {
    summary: "A moonbow over an invented lake (61.1° N, 24.6° E) on a full-moon night, in cd/m², as the eye sees it",
    value: {
      moon: { at: { utc: "2026-03-03T22:00:00Z", latitudeDeg: 61.1, longitudeDeg: 24.6 } },
      output: { normalise: "physical", vision: "eye" },
    },
  },
};

export const viewExamples = {
  "evening-sun": {
    summary: "A camera facing away from the evening sun at an invented valley town (47.2° N, 8.4° E)",
    value: { sun: { at: { utc: "2026-06-21T18:30:00Z", latitudeDeg: 47.2, longitudeDeg: 8.4 } } },
  },
  "moon-by-angles": {
    summary: "A half-lit moon 15° high in the east-south-east, seen by a camera",
    value: { moon: { azimuthDeg: 110, elevationDeg: 15, phaseAngleDeg: 90 } },
  },
};
