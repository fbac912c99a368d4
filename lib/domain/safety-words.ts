// The usual cautions of handling bins, said the same way wherever the product gives handling or
// electrical advice (the design brief's safety section; common practice, not a standard).

/** Castings and leachate are a soil amendment, not food. */
export const CASTINGS_NOT_FOOD = "Castings and leachate are not food: put them on the soil, not on produce about to be eaten.";
/** After any work in the bins. */
export const WASH_HANDS = "Wash your hands after handling bedding, food scraps or castings.";
/** Beside any electrical or handling advice: ours is general, the local rules are what count. */
export const LOCAL_CODES = "Follow local codes and licensed practice.";
