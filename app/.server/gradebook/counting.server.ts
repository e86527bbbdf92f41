// Which of a group's versions in a practical counts (gradebooks, exports, class results): the one a
// reviewer chose, else the latest marked one, else (nothing marked yet) the latest, so its status
// shows. A refused file, or a version that failed or waits, sent after a marked one never hides
// the mark.

/** SQL `order by` terms that put the counting version first among one group's versions. */
export const countingOrder = (alias: string) => `${alias}.counts_chosen desc, (${alias}.status = 'marked') desc, ${alias}.version desc`;
