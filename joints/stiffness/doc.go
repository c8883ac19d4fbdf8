// Package stiffness gives a first-order measure of how stiffly the
// connectors of a build tie each pair of parts, so that the variants of
// a sweep can be compared before any solve.
//
// Every part is taken as rigid and every connector as a spring on the
// degrees of freedom it couples: a spot weld as a short straight beam of
// the nugget's diameter and the sheets' contact length (t1+t2)/2 between
// the two sheets' ends, with Timoshenko's shear term, since shear
// dominates at length/diameter near 0.2; a bolt as its shank between
// each two consecutive sheets' centres, the same beam of the bolt's
// diameter (RigidShankFactor times stiffer for a rigid shank). Per part
// pair the springs are assembled into the 6 x 6 stiffness of the two
// parts' relative rigid motion (about the mean of the spring points),
// and its principal stiffnesses are reported: of its translational
// block, and of its rotational stiffness with the translations free to
// adjust (the Schur complement K_rr - K_rt K_tt^+ K_tr, static
// condensation), the rotational stiffness about the pair's elastic
// centre. Both are independent of the point the matrix is assembled
// about; the plain rotational block K_rr is not where the springs
// differ in stiffness (its parallel-axis terms about the mean), so a
// stiff bolt would weigh in by how far the mean of the other springs
// happens to lie from it.
//
// This is a comparison aid with rigid sheets, not a model of a joint's
// real stiffness: in reality the sheets' bending near a weld or a bolt
// dominates, and it is left out here. Only the ratios between variants
// of one model mean something. Units: N/mm for translations, N mm/rad
// for rotations, with lengths in mm and moduli in N/mm^2.
package stiffness
