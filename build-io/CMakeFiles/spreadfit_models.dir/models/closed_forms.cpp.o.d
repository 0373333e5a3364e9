CMakeFiles/spreadfit_models.dir/models/closed_forms.cpp.o: \
 /work/main/models/closed_forms.cpp /usr/include/stdc-predef.h \
 /work/main/models/closed_forms.hpp \
 /usr/include/boost/math/special_functions/beta.hpp \
 /usr/include/boost/math/special_functions/math_fwd.hpp \
 /usr/include/c++/12/vector /usr/include/c++/12/bits/stl_algobase.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/c++config.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/os_defines.h \
 /usr/include/features.h /usr/include/features-time64.h \
 /usr/include/x86_64-linux-gnu/bits/wordsize.h \
 /usr/include/x86_64-linux-gnu/bits/timesize.h \
 /usr/include/x86_64-linux-gnu/sys/cdefs.h \
 /usr/include/x86_64-linux-gnu/bits/long-double.h \
 /usr/include/x86_64-linux-gnu/gnu/stubs.h \
 /usr/include/x86_64-linux-gnu/gnu/stubs-64.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/cpu_defines.h \
 /usr/include/c++/12/pstl/pstl_config.h \
 /usr/include/c++/12/bits/functexcept.h \
 /usr/include/c++/12/bits/exception_defines.h \
 /usr/include/c++/12/bits/cpp_type_traits.h \
 /usr/include/c++/12/ext/type_traits.h \
 /usr/include/c++/12/ext/numeric_traits.h \
 /usr/include/c++/12/bits/stl_pair.h /usr/include/c++/12/type_traits \
 /usr/include/c++/12/bits/move.h /usr/include/c++/12/bits/utility.h \
 /usr/include/c++/12/compare /usr/include/c++/12/concepts \
 /usr/include/c++/12/bits/stl_iterator_base_types.h \
 /usr/include/c++/12/bits/iterator_concepts.h \
 /usr/include/c++/12/bits/ptr_traits.h \
 /usr/include/c++/12/bits/ranges_cmp.h \
 /usr/include/c++/12/bits/stl_iterator_base_funcs.h \
 /usr/include/c++/12/bits/concept_check.h \
 /usr/include/c++/12/debug/assertions.h \
 /usr/include/c++/12/bits/stl_iterator.h /usr/include/c++/12/new \
 /usr/include/c++/12/bits/exception.h \
 /usr/include/c++/12/bits/stl_construct.h \
 /usr/include/c++/12/debug/debug.h \
 /usr/include/c++/12/bits/predefined_ops.h \
 /usr/include/c++/12/bits/allocator.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/c++allocator.h \
 /usr/include/c++/12/bits/new_allocator.h \
 /usr/include/c++/12/bits/memoryfwd.h \
 /usr/include/c++/12/bits/stl_uninitialized.h \
 /usr/include/c++/12/ext/alloc_traits.h \
 /usr/include/c++/12/bits/alloc_traits.h \
 /usr/include/c++/12/bits/stl_vector.h \
 /usr/include/c++/12/initializer_list \
 /usr/include/c++/12/bits/stl_bvector.h \
 /usr/include/c++/12/bits/functional_hash.h \
 /usr/include/c++/12/bits/hash_bytes.h /usr/include/c++/12/bits/refwrap.h \
 /usr/include/c++/12/bits/invoke.h \
 /usr/include/c++/12/bits/stl_function.h \
 /usr/include/c++/12/backward/binders.h \
 /usr/include/c++/12/bits/range_access.h \
 /usr/include/c++/12/bits/vector.tcc \
 /usr/include/boost/math/special_functions/detail/round_fwd.hpp \
 /usr/include/boost/config.hpp /usr/include/boost/config/user.hpp \
 /usr/include/boost/config/detail/select_compiler_config.hpp \
 /usr/include/boost/config/compiler/gcc.hpp /usr/include/c++/12/cstddef \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/stddef.h \
 /usr/include/boost/config/detail/select_stdlib_config.hpp \
 /usr/include/c++/12/version \
 /usr/include/boost/config/stdlib/libstdcpp3.hpp /usr/include/unistd.h \
 /usr/include/x86_64-linux-gnu/bits/posix_opt.h \
 /usr/include/x86_64-linux-gnu/bits/environments.h \
 /usr/include/x86_64-linux-gnu/bits/types.h \
 /usr/include/x86_64-linux-gnu/bits/typesizes.h \
 /usr/include/x86_64-linux-gnu/bits/time64.h \
 /usr/include/x86_64-linux-gnu/bits/confname.h \
 /usr/include/x86_64-linux-gnu/bits/getopt_posix.h \
 /usr/include/x86_64-linux-gnu/bits/getopt_core.h \
 /usr/include/x86_64-linux-gnu/bits/unistd_ext.h \
 /usr/include/linux/close_range.h \
 /usr/include/boost/config/detail/select_platform_config.hpp \
 /usr/include/boost/config/platform/linux.hpp /usr/include/c++/12/cstdlib \
 /usr/include/stdlib.h \
 /usr/include/x86_64-linux-gnu/bits/libc-header-start.h \
 /usr/include/x86_64-linux-gnu/bits/waitflags.h \
 /usr/include/x86_64-linux-gnu/bits/waitstatus.h \
 /usr/include/x86_64-linux-gnu/bits/floatn.h \
 /usr/include/x86_64-linux-gnu/bits/floatn-common.h \
 /usr/include/x86_64-linux-gnu/bits/types/locale_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__locale_t.h \
 /usr/include/x86_64-linux-gnu/sys/types.h \
 /usr/include/x86_64-linux-gnu/bits/types/clock_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/clockid_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/time_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/timer_t.h \
 /usr/include/x86_64-linux-gnu/bits/stdint-intn.h /usr/include/endian.h \
 /usr/include/x86_64-linux-gnu/bits/endian.h \
 /usr/include/x86_64-linux-gnu/bits/endianness.h \
 /usr/include/x86_64-linux-gnu/bits/byteswap.h \
 /usr/include/x86_64-linux-gnu/bits/uintn-identity.h \
 /usr/include/x86_64-linux-gnu/sys/select.h \
 /usr/include/x86_64-linux-gnu/bits/select.h \
 /usr/include/x86_64-linux-gnu/bits/types/sigset_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__sigset_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_timeval.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_timespec.h \
 /usr/include/x86_64-linux-gnu/bits/pthreadtypes.h \
 /usr/include/x86_64-linux-gnu/bits/thread-shared-types.h \
 /usr/include/x86_64-linux-gnu/bits/pthreadtypes-arch.h \
 /usr/include/x86_64-linux-gnu/bits/atomic_wide_counter.h \
 /usr/include/x86_64-linux-gnu/bits/struct_mutex.h \
 /usr/include/x86_64-linux-gnu/bits/struct_rwlock.h /usr/include/alloca.h \
 /usr/include/x86_64-linux-gnu/bits/stdlib-bsearch.h \
 /usr/include/x86_64-linux-gnu/bits/stdlib-float.h \
 /usr/include/c++/12/bits/std_abs.h \
 /usr/include/boost/config/detail/posix_features.hpp \
 /usr/include/boost/config/detail/suffix.hpp \
 /usr/include/boost/config/helper_macros.hpp \
 /usr/include/boost/math/tools/promotion.hpp \
 /usr/include/boost/math/tools/config.hpp \
 /usr/include/boost/predef/architecture/x86.h \
 /usr/include/boost/predef/architecture/x86/32.h \
 /usr/include/boost/predef/version_number.h \
 /usr/include/boost/predef/make.h /usr/include/boost/predef/detail/test.h \
 /usr/include/boost/predef/architecture/x86/64.h \
 /usr/include/boost/cstdint.hpp \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/stdint.h /usr/include/stdint.h \
 /usr/include/x86_64-linux-gnu/bits/wchar.h \
 /usr/include/x86_64-linux-gnu/bits/stdint-uintn.h \
 /usr/include/boost/detail/workaround.hpp \
 /usr/include/boost/config/workaround.hpp \
 /usr/include/boost/type_traits/is_integral.hpp \
 /usr/include/boost/type_traits/integral_constant.hpp \
 /usr/include/c++/12/algorithm /usr/include/c++/12/bits/stl_algo.h \
 /usr/include/c++/12/bits/algorithmfwd.h \
 /usr/include/c++/12/bits/stl_heap.h \
 /usr/include/c++/12/bits/stl_tempbuf.h \
 /usr/include/c++/12/bits/uniform_int_dist.h \
 /usr/include/c++/12/bits/ranges_algo.h \
 /usr/include/c++/12/bits/ranges_algobase.h \
 /usr/include/c++/12/bits/ranges_base.h \
 /usr/include/c++/12/bits/max_size_type.h /usr/include/c++/12/numbers \
 /usr/include/c++/12/bits/ranges_util.h \
 /usr/include/c++/12/pstl/glue_algorithm_defs.h \
 /usr/include/c++/12/pstl/execution_defs.h \
 /usr/include/boost/config/no_tr1/cmath.hpp /usr/include/c++/12/cmath \
 /usr/include/math.h /usr/include/x86_64-linux-gnu/bits/math-vector.h \
 /usr/include/x86_64-linux-gnu/bits/libm-simd-decl-stubs.h \
 /usr/include/x86_64-linux-gnu/bits/flt-eval-method.h \
 /usr/include/x86_64-linux-gnu/bits/fp-logb.h \
 /usr/include/x86_64-linux-gnu/bits/fp-fast.h \
 /usr/include/x86_64-linux-gnu/bits/mathcalls-helper-functions.h \
 /usr/include/x86_64-linux-gnu/bits/mathcalls.h \
 /usr/include/x86_64-linux-gnu/bits/mathcalls-narrow.h \
 /usr/include/x86_64-linux-gnu/bits/iscanonical.h \
 /usr/include/c++/12/bits/specfun.h /usr/include/c++/12/limits \
 /usr/include/c++/12/tr1/gamma.tcc \
 /usr/include/c++/12/tr1/special_function_util.h \
 /usr/include/c++/12/tr1/bessel_function.tcc \
 /usr/include/c++/12/tr1/beta_function.tcc \
 /usr/include/c++/12/tr1/ell_integral.tcc \
 /usr/include/c++/12/tr1/exp_integral.tcc \
 /usr/include/c++/12/tr1/hypergeometric.tcc \
 /usr/include/c++/12/tr1/legendre_function.tcc \
 /usr/include/c++/12/tr1/modified_bessel_func.tcc \
 /usr/include/c++/12/tr1/poly_hermite.tcc \
 /usr/include/c++/12/tr1/poly_laguerre.tcc \
 /usr/include/c++/12/tr1/riemann_zeta.tcc /usr/include/c++/12/climits \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/limits.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/syslimits.h \
 /usr/include/limits.h /usr/include/x86_64-linux-gnu/bits/posix1_lim.h \
 /usr/include/x86_64-linux-gnu/bits/local_lim.h \
 /usr/include/linux/limits.h \
 /usr/include/x86_64-linux-gnu/bits/pthread_stack_min-dynamic.h \
 /usr/include/x86_64-linux-gnu/bits/posix2_lim.h \
 /usr/include/x86_64-linux-gnu/bits/xopen_lim.h \
 /usr/include/x86_64-linux-gnu/bits/uio_lim.h /usr/include/c++/12/cfloat \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/float.h \
 /usr/include/boost/math/tools/user.hpp \
 /usr/include/boost/type_traits/is_floating_point.hpp \
 /usr/include/boost/type_traits/is_convertible.hpp \
 /usr/include/boost/type_traits/intrinsics.hpp \
 /usr/include/boost/type_traits/detail/config.hpp \
 /usr/include/boost/version.hpp \
 /usr/include/boost/type_traits/is_complete.hpp \
 /usr/include/boost/type_traits/declval.hpp \
 /usr/include/boost/type_traits/add_rvalue_reference.hpp \
 /usr/include/boost/type_traits/is_void.hpp \
 /usr/include/boost/type_traits/is_reference.hpp \
 /usr/include/boost/type_traits/is_lvalue_reference.hpp \
 /usr/include/boost/type_traits/is_rvalue_reference.hpp \
 /usr/include/boost/type_traits/remove_reference.hpp \
 /usr/include/boost/type_traits/is_function.hpp \
 /usr/include/boost/type_traits/detail/is_function_cxx_11.hpp \
 /usr/include/boost/type_traits/detail/yes_no_type.hpp \
 /usr/include/boost/type_traits/is_array.hpp \
 /usr/include/boost/static_assert.hpp \
 /usr/include/boost/type_traits/is_arithmetic.hpp \
 /usr/include/boost/type_traits/is_abstract.hpp \
 /usr/include/boost/type_traits/add_lvalue_reference.hpp \
 /usr/include/boost/type_traits/add_reference.hpp \
 /usr/include/boost/type_traits/is_same.hpp \
 /usr/include/boost/type_traits/remove_cv.hpp \
 /usr/include/boost/mpl/if.hpp /usr/include/boost/mpl/aux_/value_wknd.hpp \
 /usr/include/boost/mpl/aux_/static_cast.hpp \
 /usr/include/boost/mpl/aux_/config/workaround.hpp \
 /usr/include/boost/mpl/aux_/config/integral.hpp \
 /usr/include/boost/mpl/aux_/config/msvc.hpp \
 /usr/include/boost/mpl/aux_/config/eti.hpp \
 /usr/include/boost/mpl/aux_/na_spec.hpp \
 /usr/include/boost/mpl/lambda_fwd.hpp \
 /usr/include/boost/mpl/void_fwd.hpp \
 /usr/include/boost/mpl/aux_/adl_barrier.hpp \
 /usr/include/boost/mpl/aux_/config/adl.hpp \
 /usr/include/boost/mpl/aux_/config/intel.hpp \
 /usr/include/boost/mpl/aux_/config/gcc.hpp \
 /usr/include/boost/mpl/aux_/na.hpp /usr/include/boost/mpl/bool.hpp \
 /usr/include/boost/mpl/bool_fwd.hpp \
 /usr/include/boost/mpl/integral_c_tag.hpp \
 /usr/include/boost/mpl/aux_/config/static_constant.hpp \
 /usr/include/boost/mpl/aux_/na_fwd.hpp \
 /usr/include/boost/mpl/aux_/config/ctps.hpp \
 /usr/include/boost/mpl/aux_/config/lambda.hpp \
 /usr/include/boost/mpl/aux_/config/ttp.hpp \
 /usr/include/boost/mpl/int.hpp /usr/include/boost/mpl/int_fwd.hpp \
 /usr/include/boost/mpl/aux_/nttp_decl.hpp \
 /usr/include/boost/mpl/aux_/config/nttp.hpp \
 /usr/include/boost/mpl/aux_/integral_wrapper.hpp \
 /usr/include/boost/preprocessor/cat.hpp \
 /usr/include/boost/preprocessor/config/config.hpp \
 /usr/include/boost/mpl/aux_/lambda_arity_param.hpp \
 /usr/include/boost/mpl/aux_/template_arity_fwd.hpp \
 /usr/include/boost/mpl/aux_/arity.hpp \
 /usr/include/boost/mpl/aux_/config/dtp.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/params.hpp \
 /usr/include/boost/mpl/aux_/config/preprocessor.hpp \
 /usr/include/boost/preprocessor/comma_if.hpp \
 /usr/include/boost/preprocessor/punctuation/comma_if.hpp \
 /usr/include/boost/preprocessor/control/if.hpp \
 /usr/include/boost/preprocessor/control/iif.hpp \
 /usr/include/boost/preprocessor/logical/bool.hpp \
 /usr/include/boost/preprocessor/facilities/empty.hpp \
 /usr/include/boost/preprocessor/punctuation/comma.hpp \
 /usr/include/boost/preprocessor/repeat.hpp \
 /usr/include/boost/preprocessor/repetition/repeat.hpp \
 /usr/include/boost/preprocessor/debug/error.hpp \
 /usr/include/boost/preprocessor/detail/auto_rec.hpp \
 /usr/include/boost/preprocessor/tuple/eat.hpp \
 /usr/include/boost/preprocessor/inc.hpp \
 /usr/include/boost/preprocessor/arithmetic/inc.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/enum.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/def_params_tail.hpp \
 /usr/include/boost/mpl/limits/arity.hpp \
 /usr/include/boost/preprocessor/logical/and.hpp \
 /usr/include/boost/preprocessor/logical/bitand.hpp \
 /usr/include/boost/preprocessor/identity.hpp \
 /usr/include/boost/preprocessor/facilities/identity.hpp \
 /usr/include/boost/preprocessor/empty.hpp \
 /usr/include/boost/preprocessor/arithmetic/add.hpp \
 /usr/include/boost/preprocessor/arithmetic/dec.hpp \
 /usr/include/boost/preprocessor/control/while.hpp \
 /usr/include/boost/preprocessor/list/fold_left.hpp \
 /usr/include/boost/preprocessor/list/detail/fold_left.hpp \
 /usr/include/boost/preprocessor/control/expr_iif.hpp \
 /usr/include/boost/preprocessor/list/adt.hpp \
 /usr/include/boost/preprocessor/detail/is_binary.hpp \
 /usr/include/boost/preprocessor/detail/check.hpp \
 /usr/include/boost/preprocessor/logical/compl.hpp \
 /usr/include/boost/preprocessor/list/fold_right.hpp \
 /usr/include/boost/preprocessor/list/detail/fold_right.hpp \
 /usr/include/boost/preprocessor/list/reverse.hpp \
 /usr/include/boost/preprocessor/control/detail/while.hpp \
 /usr/include/boost/preprocessor/tuple/elem.hpp \
 /usr/include/boost/preprocessor/facilities/expand.hpp \
 /usr/include/boost/preprocessor/facilities/overload.hpp \
 /usr/include/boost/preprocessor/variadic/size.hpp \
 /usr/include/boost/preprocessor/tuple/rem.hpp \
 /usr/include/boost/preprocessor/tuple/detail/is_single_return.hpp \
 /usr/include/boost/preprocessor/variadic/elem.hpp \
 /usr/include/boost/preprocessor/arithmetic/sub.hpp \
 /usr/include/boost/mpl/aux_/config/overload_resolution.hpp \
 /usr/include/boost/mpl/aux_/lambda_support.hpp \
 /usr/include/boost/mpl/and.hpp \
 /usr/include/boost/mpl/aux_/config/use_preprocessed.hpp \
 /usr/include/boost/mpl/aux_/nested_type_wknd.hpp \
 /usr/include/boost/mpl/aux_/include_preprocessed.hpp \
 /usr/include/boost/mpl/aux_/config/compiler.hpp \
 /usr/include/boost/preprocessor/stringize.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/and.hpp \
 /usr/include/boost/mpl/or.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/or.hpp \
 /usr/include/boost/mpl/not.hpp \
 /usr/include/boost/math/policies/policy.hpp \
 /usr/include/boost/mpl/list.hpp /usr/include/boost/mpl/limits/list.hpp \
 /usr/include/boost/mpl/list/list20.hpp \
 /usr/include/boost/mpl/list/list10.hpp \
 /usr/include/boost/mpl/list/list0.hpp /usr/include/boost/mpl/long.hpp \
 /usr/include/boost/mpl/long_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/push_front.hpp \
 /usr/include/boost/mpl/push_front_fwd.hpp \
 /usr/include/boost/mpl/next.hpp /usr/include/boost/mpl/next_prior.hpp \
 /usr/include/boost/mpl/aux_/common_name_wknd.hpp \
 /usr/include/boost/mpl/list/aux_/item.hpp \
 /usr/include/boost/mpl/list/aux_/tag.hpp \
 /usr/include/boost/mpl/list/aux_/pop_front.hpp \
 /usr/include/boost/mpl/pop_front_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/push_back.hpp \
 /usr/include/boost/mpl/push_back_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/front.hpp \
 /usr/include/boost/mpl/front_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/clear.hpp \
 /usr/include/boost/mpl/clear_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/O1_size.hpp \
 /usr/include/boost/mpl/O1_size_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/size.hpp \
 /usr/include/boost/mpl/size_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/empty.hpp \
 /usr/include/boost/mpl/empty_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/begin_end.hpp \
 /usr/include/boost/mpl/begin_end_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/iterator.hpp \
 /usr/include/boost/mpl/iterator_tags.hpp \
 /usr/include/boost/mpl/deref.hpp \
 /usr/include/boost/mpl/aux_/msvc_type.hpp \
 /usr/include/boost/mpl/aux_/is_msvc_eti_arg.hpp \
 /usr/include/boost/mpl/aux_/yes_no.hpp \
 /usr/include/boost/mpl/aux_/config/arrays.hpp \
 /usr/include/boost/mpl/aux_/lambda_spec.hpp \
 /usr/include/boost/mpl/void.hpp \
 /usr/include/boost/mpl/list/aux_/include_preprocessed.hpp \
 /usr/include/boost/mpl/list/aux_/preprocessed/plain/list10.hpp \
 /usr/include/boost/mpl/list/aux_/preprocessed/plain/list20.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/list.hpp \
 /usr/include/boost/mpl/contains.hpp \
 /usr/include/boost/mpl/contains_fwd.hpp \
 /usr/include/boost/mpl/sequence_tag.hpp \
 /usr/include/boost/mpl/sequence_tag_fwd.hpp \
 /usr/include/boost/mpl/aux_/has_tag.hpp \
 /usr/include/boost/mpl/has_xxx.hpp \
 /usr/include/boost/mpl/aux_/type_wrapper.hpp \
 /usr/include/boost/mpl/aux_/config/has_xxx.hpp \
 /usr/include/boost/mpl/aux_/config/msvc_typename.hpp \
 /usr/include/boost/preprocessor/array/elem.hpp \
 /usr/include/boost/preprocessor/array/data.hpp \
 /usr/include/boost/preprocessor/array/size.hpp \
 /usr/include/boost/preprocessor/repetition/enum_params.hpp \
 /usr/include/boost/preprocessor/repetition/enum_trailing_params.hpp \
 /usr/include/boost/mpl/aux_/has_begin.hpp \
 /usr/include/boost/mpl/aux_/contains_impl.hpp \
 /usr/include/boost/mpl/begin_end.hpp \
 /usr/include/boost/mpl/aux_/begin_end_impl.hpp \
 /usr/include/boost/mpl/eval_if.hpp \
 /usr/include/boost/mpl/aux_/traits_lambda_spec.hpp \
 /usr/include/boost/mpl/find.hpp /usr/include/boost/mpl/find_if.hpp \
 /usr/include/boost/mpl/aux_/find_if_pred.hpp \
 /usr/include/boost/mpl/aux_/iter_apply.hpp \
 /usr/include/boost/mpl/apply.hpp /usr/include/boost/mpl/apply_fwd.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/apply_fwd.hpp \
 /usr/include/boost/mpl/apply_wrap.hpp \
 /usr/include/boost/mpl/aux_/has_apply.hpp \
 /usr/include/boost/mpl/aux_/config/has_apply.hpp \
 /usr/include/boost/mpl/aux_/msvc_never_true.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/apply_wrap.hpp \
 /usr/include/boost/mpl/placeholders.hpp /usr/include/boost/mpl/arg.hpp \
 /usr/include/boost/mpl/arg_fwd.hpp \
 /usr/include/boost/mpl/aux_/na_assert.hpp \
 /usr/include/boost/mpl/assert.hpp \
 /usr/include/boost/mpl/aux_/config/gpu.hpp \
 /usr/include/boost/mpl/aux_/config/pp_counter.hpp \
 /usr/include/boost/mpl/aux_/arity_spec.hpp \
 /usr/include/boost/mpl/aux_/arg_typedef.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/arg.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/placeholders.hpp \
 /usr/include/boost/mpl/lambda.hpp /usr/include/boost/mpl/bind.hpp \
 /usr/include/boost/mpl/bind_fwd.hpp \
 /usr/include/boost/mpl/aux_/config/bind.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/bind_fwd.hpp \
 /usr/include/boost/mpl/protect.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/bind.hpp \
 /usr/include/boost/mpl/aux_/full_lambda.hpp \
 /usr/include/boost/mpl/quote.hpp \
 /usr/include/boost/mpl/aux_/has_type.hpp \
 /usr/include/boost/mpl/aux_/config/bcc.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/quote.hpp \
 /usr/include/boost/mpl/aux_/template_arity.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/template_arity.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/full_lambda.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/apply.hpp \
 /usr/include/boost/mpl/iter_fold_if.hpp \
 /usr/include/boost/mpl/logical.hpp /usr/include/boost/mpl/always.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/default_params.hpp \
 /usr/include/boost/mpl/pair.hpp \
 /usr/include/boost/mpl/aux_/msvc_eti_base.hpp \
 /usr/include/boost/mpl/aux_/iter_fold_if_impl.hpp \
 /usr/include/boost/mpl/identity.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/iter_fold_if_impl.hpp \
 /usr/include/boost/mpl/aux_/config/forwarding.hpp \
 /usr/include/boost/mpl/same_as.hpp /usr/include/boost/mpl/remove_if.hpp \
 /usr/include/boost/mpl/fold.hpp /usr/include/boost/mpl/O1_size.hpp \
 /usr/include/boost/mpl/aux_/O1_size_impl.hpp \
 /usr/include/boost/mpl/aux_/has_size.hpp \
 /usr/include/boost/mpl/aux_/fold_impl.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/fold_impl.hpp \
 /usr/include/boost/mpl/reverse_fold.hpp \
 /usr/include/boost/mpl/aux_/reverse_fold_impl.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/reverse_fold_impl.hpp \
 /usr/include/boost/mpl/aux_/inserter_algorithm.hpp \
 /usr/include/boost/mpl/back_inserter.hpp \
 /usr/include/boost/mpl/push_back.hpp \
 /usr/include/boost/mpl/aux_/push_back_impl.hpp \
 /usr/include/boost/mpl/inserter.hpp \
 /usr/include/boost/mpl/front_inserter.hpp \
 /usr/include/boost/mpl/push_front.hpp \
 /usr/include/boost/mpl/aux_/push_front_impl.hpp \
 /usr/include/boost/mpl/clear.hpp \
 /usr/include/boost/mpl/aux_/clear_impl.hpp \
 /usr/include/boost/mpl/vector.hpp \
 /usr/include/boost/mpl/limits/vector.hpp \
 /usr/include/boost/mpl/vector/vector20.hpp \
 /usr/include/boost/mpl/vector/vector10.hpp \
 /usr/include/boost/mpl/vector/vector0.hpp \
 /usr/include/boost/mpl/vector/aux_/at.hpp \
 /usr/include/boost/mpl/at_fwd.hpp \
 /usr/include/boost/mpl/vector/aux_/tag.hpp \
 /usr/include/boost/mpl/aux_/config/typeof.hpp \
 /usr/include/boost/mpl/vector/aux_/front.hpp \
 /usr/include/boost/mpl/vector/aux_/push_front.hpp \
 /usr/include/boost/mpl/vector/aux_/item.hpp \
 /usr/include/boost/mpl/vector/aux_/pop_front.hpp \
 /usr/include/boost/mpl/vector/aux_/push_back.hpp \
 /usr/include/boost/mpl/vector/aux_/pop_back.hpp \
 /usr/include/boost/mpl/pop_back_fwd.hpp \
 /usr/include/boost/mpl/vector/aux_/back.hpp \
 /usr/include/boost/mpl/back_fwd.hpp \
 /usr/include/boost/mpl/vector/aux_/clear.hpp \
 /usr/include/boost/mpl/vector/aux_/vector0.hpp \
 /usr/include/boost/mpl/vector/aux_/iterator.hpp \
 /usr/include/boost/mpl/plus.hpp \
 /usr/include/boost/mpl/aux_/arithmetic_op.hpp \
 /usr/include/boost/mpl/integral_c.hpp \
 /usr/include/boost/mpl/integral_c_fwd.hpp \
 /usr/include/boost/mpl/aux_/largest_int.hpp \
 /usr/include/boost/mpl/aux_/numeric_op.hpp \
 /usr/include/boost/mpl/numeric_cast.hpp /usr/include/boost/mpl/tag.hpp \
 /usr/include/boost/mpl/aux_/numeric_cast_utils.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/plus.hpp \
 /usr/include/boost/mpl/minus.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/minus.hpp \
 /usr/include/boost/mpl/advance_fwd.hpp \
 /usr/include/boost/mpl/distance_fwd.hpp /usr/include/boost/mpl/prior.hpp \
 /usr/include/boost/mpl/vector/aux_/O1_size.hpp \
 /usr/include/boost/mpl/vector/aux_/size.hpp \
 /usr/include/boost/mpl/vector/aux_/empty.hpp \
 /usr/include/boost/mpl/vector/aux_/begin_end.hpp \
 /usr/include/boost/mpl/vector/aux_/include_preprocessed.hpp \
 /usr/include/boost/mpl/vector/aux_/preprocessed/typeof_based/vector10.hpp \
 /usr/include/boost/mpl/vector/aux_/preprocessed/typeof_based/vector20.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/vector.hpp \
 /usr/include/boost/mpl/at.hpp /usr/include/boost/mpl/aux_/at_impl.hpp \
 /usr/include/boost/mpl/advance.hpp /usr/include/boost/mpl/less.hpp \
 /usr/include/boost/mpl/aux_/comparison_op.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/less.hpp \
 /usr/include/boost/mpl/negate.hpp \
 /usr/include/boost/mpl/aux_/advance_forward.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/advance_forward.hpp \
 /usr/include/boost/mpl/aux_/advance_backward.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/advance_backward.hpp \
 /usr/include/boost/mpl/size.hpp \
 /usr/include/boost/mpl/aux_/size_impl.hpp \
 /usr/include/boost/mpl/distance.hpp /usr/include/boost/mpl/iter_fold.hpp \
 /usr/include/boost/mpl/aux_/iter_fold_impl.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/iter_fold_impl.hpp \
 /usr/include/boost/mpl/iterator_range.hpp \
 /usr/include/boost/mpl/comparison.hpp \
 /usr/include/boost/mpl/equal_to.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/equal_to.hpp \
 /usr/include/boost/mpl/not_equal_to.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/not_equal_to.hpp \
 /usr/include/boost/mpl/greater.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/greater.hpp \
 /usr/include/boost/mpl/less_equal.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/less_equal.hpp \
 /usr/include/boost/mpl/greater_equal.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/greater_equal.hpp \
 /usr/include/boost/assert.hpp /usr/include/assert.h \
 /usr/include/c++/12/stdlib.h /usr/include/c++/12/math.h \
 /usr/include/boost/utility/enable_if.hpp \
 /usr/include/boost/core/enable_if.hpp \
 /usr/include/boost/config/no_tr1/complex.hpp /usr/include/c++/12/complex \
 /usr/include/c++/12/sstream /usr/include/c++/12/istream \
 /usr/include/c++/12/ios /usr/include/c++/12/iosfwd \
 /usr/include/c++/12/bits/stringfwd.h /usr/include/c++/12/bits/postypes.h \
 /usr/include/c++/12/cwchar /usr/include/wchar.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/stdarg.h \
 /usr/include/x86_64-linux-gnu/bits/types/wint_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/mbstate_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__mbstate_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__FILE.h \
 /usr/include/x86_64-linux-gnu/bits/types/FILE.h \
 /usr/include/c++/12/exception /usr/include/c++/12/bits/exception_ptr.h \
 /usr/include/c++/12/bits/cxxabi_init_exception.h \
 /usr/include/c++/12/typeinfo /usr/include/c++/12/bits/nested_exception.h \
 /usr/include/c++/12/bits/char_traits.h /usr/include/c++/12/cstdint \
 /usr/include/c++/12/bits/localefwd.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/c++locale.h \
 /usr/include/c++/12/clocale /usr/include/locale.h \
 /usr/include/x86_64-linux-gnu/bits/locale.h /usr/include/c++/12/cctype \
 /usr/include/ctype.h /usr/include/c++/12/bits/ios_base.h \
 /usr/include/c++/12/ext/atomicity.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/gthr.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/gthr-default.h \
 /usr/include/pthread.h /usr/include/sched.h \
 /usr/include/x86_64-linux-gnu/bits/sched.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_sched_param.h \
 /usr/include/x86_64-linux-gnu/bits/cpu-set.h /usr/include/time.h \
 /usr/include/x86_64-linux-gnu/bits/time.h \
 /usr/include/x86_64-linux-gnu/bits/timex.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_tm.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_itimerspec.h \
 /usr/include/x86_64-linux-gnu/bits/setjmp.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct___jmp_buf_tag.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/atomic_word.h \
 /usr/include/x86_64-linux-gnu/sys/single_threaded.h \
 /usr/include/c++/12/bits/locale_classes.h /usr/include/c++/12/string \
 /usr/include/c++/12/bits/ostream_insert.h \
 /usr/include/c++/12/bits/cxxabi_forced.h \
 /usr/include/c++/12/bits/basic_string.h /usr/include/c++/12/string_view \
 /usr/include/c++/12/bits/string_view.tcc \
 /usr/include/c++/12/ext/string_conversions.h /usr/include/c++/12/cstdio \
 /usr/include/stdio.h /usr/include/x86_64-linux-gnu/bits/types/__fpos_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__fpos64_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_FILE.h \
 /usr/include/x86_64-linux-gnu/bits/types/cookie_io_functions_t.h \
 /usr/include/x86_64-linux-gnu/bits/stdio_lim.h \
 /usr/include/x86_64-linux-gnu/bits/stdio.h /usr/include/c++/12/cerrno \
 /usr/include/errno.h /usr/include/x86_64-linux-gnu/bits/errno.h \
 /usr/include/linux/errno.h /usr/include/x86_64-linux-gnu/asm/errno.h \
 /usr/include/asm-generic/errno.h /usr/include/asm-generic/errno-base.h \
 /usr/include/x86_64-linux-gnu/bits/types/error_t.h \
 /usr/include/c++/12/bits/charconv.h \
 /usr/include/c++/12/bits/basic_string.tcc \
 /usr/include/c++/12/bits/locale_classes.tcc \
 /usr/include/c++/12/system_error \
 /usr/include/x86_64-linux-gnu/c++/12/bits/error_constants.h \
 /usr/include/c++/12/stdexcept /usr/include/c++/12/streambuf \
 /usr/include/c++/12/bits/streambuf.tcc \
 /usr/include/c++/12/bits/basic_ios.h \
 /usr/include/c++/12/bits/locale_facets.h /usr/include/c++/12/cwctype \
 /usr/include/wctype.h /usr/include/x86_64-linux-gnu/bits/wctype-wchar.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/ctype_base.h \
 /usr/include/c++/12/bits/streambuf_iterator.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/ctype_inline.h \
 /usr/include/c++/12/bits/locale_facets.tcc \
 /usr/include/c++/12/bits/basic_ios.tcc /usr/include/c++/12/ostream \
 /usr/include/c++/12/bits/ostream.tcc \
 /usr/include/c++/12/bits/istream.tcc \
 /usr/include/c++/12/bits/sstream.tcc \
 /usr/include/boost/math/special_functions/gamma.hpp \
 /usr/include/boost/math/tools/series.hpp /usr/include/boost/limits.hpp \
 /usr/include/boost/math/tools/fraction.hpp \
 /usr/include/boost/math/tools/precision.hpp \
 /usr/include/boost/math/tools/complex.hpp \
 /usr/include/boost/type_traits/is_complex.hpp \
 /usr/include/boost/math/policies/error_handling.hpp \
 /usr/include/c++/12/iomanip /usr/include/c++/12/locale \
 /usr/include/c++/12/bits/locale_facets_nonio.h /usr/include/c++/12/ctime \
 /usr/include/x86_64-linux-gnu/c++/12/bits/time_members.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/messages_members.h \
 /usr/include/libintl.h /usr/include/c++/12/bits/codecvt.h \
 /usr/include/c++/12/bits/locale_facets_nonio.tcc \
 /usr/include/c++/12/bits/locale_conv.h \
 /usr/include/c++/12/bits/quoted_string.h /usr/include/c++/12/cstring \
 /usr/include/string.h /usr/include/strings.h \
 /usr/include/boost/throw_exception.hpp \
 /usr/include/boost/assert/source_location.hpp \
 /usr/include/boost/current_function.hpp \
 /usr/include/boost/exception/exception.hpp \
 /usr/include/boost/math/constants/constants.hpp \
 /usr/include/boost/math/tools/cxx03_warn.hpp \
 /usr/include/boost/config/pragma_message.hpp \
 /usr/include/boost/math/tools/convert_from_string.hpp \
 /usr/include/boost/type_traits/is_constructible.hpp \
 /usr/include/boost/type_traits/is_destructible.hpp \
 /usr/include/boost/type_traits/is_default_constructible.hpp \
 /usr/include/boost/type_traits/conditional.hpp \
 /usr/include/boost/lexical_cast.hpp \
 /usr/include/boost/range/iterator_range_core.hpp \
 /usr/include/boost/iterator/iterator_traits.hpp \
 /usr/include/c++/12/iterator /usr/include/c++/12/bits/stream_iterator.h \
 /usr/include/boost/iterator/iterator_facade.hpp \
 /usr/include/boost/iterator/interoperable.hpp \
 /usr/include/boost/iterator/detail/config_def.hpp \
 /usr/include/boost/iterator/detail/config_undef.hpp \
 /usr/include/boost/iterator/iterator_categories.hpp \
 /usr/include/boost/iterator/detail/facade_iterator_category.hpp \
 /usr/include/boost/core/use_default.hpp \
 /usr/include/boost/type_traits/is_const.hpp \
 /usr/include/boost/detail/indirect_traits.hpp \
 /usr/include/boost/type_traits/is_pointer.hpp \
 /usr/include/boost/type_traits/is_class.hpp \
 /usr/include/boost/type_traits/is_volatile.hpp \
 /usr/include/boost/type_traits/is_member_function_pointer.hpp \
 /usr/include/boost/type_traits/detail/is_member_function_pointer_cxx_11.hpp \
 /usr/include/boost/type_traits/is_member_pointer.hpp \
 /usr/include/boost/type_traits/remove_pointer.hpp \
 /usr/include/boost/detail/select_type.hpp \
 /usr/include/boost/iterator/detail/enable_if.hpp \
 /usr/include/boost/core/addressof.hpp \
 /usr/include/boost/type_traits/add_const.hpp \
 /usr/include/boost/type_traits/add_pointer.hpp \
 /usr/include/boost/type_traits/remove_const.hpp \
 /usr/include/boost/type_traits/is_pod.hpp \
 /usr/include/boost/type_traits/is_scalar.hpp \
 /usr/include/boost/type_traits/is_enum.hpp \
 /usr/include/boost/type_traits/is_base_and_derived.hpp \
 /usr/include/boost/range/functions.hpp \
 /usr/include/boost/range/begin.hpp /usr/include/boost/range/config.hpp \
 /usr/include/boost/range/iterator.hpp \
 /usr/include/boost/range/range_fwd.hpp \
 /usr/include/boost/range/mutable_iterator.hpp \
 /usr/include/boost/range/detail/extract_optional_type.hpp \
 /usr/include/c++/12/utility /usr/include/c++/12/bits/stl_relops.h \
 /usr/include/boost/range/detail/msvc_has_iterator_workaround.hpp \
 /usr/include/boost/range/const_iterator.hpp \
 /usr/include/boost/range/end.hpp \
 /usr/include/boost/range/detail/implementation_help.hpp \
 /usr/include/boost/range/detail/common.hpp \
 /usr/include/boost/range/detail/sfinae.hpp \
 /usr/include/boost/range/size.hpp /usr/include/boost/range/size_type.hpp \
 /usr/include/boost/range/difference_type.hpp \
 /usr/include/boost/range/has_range_iterator.hpp \
 /usr/include/boost/range/concepts.hpp \
 /usr/include/boost/concept_check.hpp \
 /usr/include/boost/concept/assert.hpp \
 /usr/include/boost/concept/detail/general.hpp \
 /usr/include/boost/concept/detail/backward_compatibility.hpp \
 /usr/include/boost/concept/detail/has_constraints.hpp \
 /usr/include/boost/type_traits/conversion_traits.hpp \
 /usr/include/boost/concept/usage.hpp \
 /usr/include/boost/concept/detail/concept_def.hpp \
 /usr/include/boost/preprocessor/seq/for_each_i.hpp \
 /usr/include/boost/preprocessor/repetition/for.hpp \
 /usr/include/boost/preprocessor/repetition/detail/for.hpp \
 /usr/include/boost/preprocessor/seq/seq.hpp \
 /usr/include/boost/preprocessor/seq/elem.hpp \
 /usr/include/boost/preprocessor/seq/size.hpp \
 /usr/include/boost/preprocessor/seq/detail/is_empty.hpp \
 /usr/include/boost/preprocessor/seq/enum.hpp \
 /usr/include/boost/concept/detail/concept_undef.hpp \
 /usr/include/boost/iterator/iterator_concepts.hpp \
 /usr/include/boost/range/value_type.hpp \
 /usr/include/boost/range/detail/misc_concept.hpp \
 /usr/include/boost/type_traits/make_unsigned.hpp \
 /usr/include/boost/type_traits/is_signed.hpp \
 /usr/include/boost/type_traits/is_unsigned.hpp \
 /usr/include/boost/type_traits/add_volatile.hpp \
 /usr/include/boost/range/detail/has_member_size.hpp \
 /usr/include/boost/utility.hpp \
 /usr/include/boost/utility/base_from_member.hpp \
 /usr/include/boost/preprocessor/repetition/enum_binary_params.hpp \
 /usr/include/boost/preprocessor/repetition/repeat_from_to.hpp \
 /usr/include/boost/utility/binary.hpp \
 /usr/include/boost/preprocessor/control/deduce_d.hpp \
 /usr/include/boost/preprocessor/seq/cat.hpp \
 /usr/include/boost/preprocessor/seq/fold_left.hpp \
 /usr/include/boost/preprocessor/seq/transform.hpp \
 /usr/include/boost/preprocessor/arithmetic/mod.hpp \
 /usr/include/boost/preprocessor/arithmetic/detail/div_base.hpp \
 /usr/include/boost/preprocessor/comparison/less_equal.hpp \
 /usr/include/boost/preprocessor/logical/not.hpp \
 /usr/include/boost/utility/identity_type.hpp \
 /usr/include/boost/type_traits/function_traits.hpp \
 /usr/include/boost/core/checked_delete.hpp \
 /usr/include/boost/core/noncopyable.hpp \
 /usr/include/boost/range/distance.hpp \
 /usr/include/boost/iterator/distance.hpp \
 /usr/include/boost/range/empty.hpp /usr/include/boost/range/rbegin.hpp \
 /usr/include/boost/range/reverse_iterator.hpp \
 /usr/include/boost/iterator/reverse_iterator.hpp \
 /usr/include/boost/iterator/iterator_adaptor.hpp \
 /usr/include/boost/range/rend.hpp \
 /usr/include/boost/range/algorithm/equal.hpp \
 /usr/include/boost/range/detail/safe_bool.hpp \
 /usr/include/boost/next_prior.hpp \
 /usr/include/boost/type_traits/has_plus.hpp \
 /usr/include/boost/type_traits/detail/has_binary_operator.hpp \
 /usr/include/boost/type_traits/make_void.hpp \
 /usr/include/boost/type_traits/has_plus_assign.hpp \
 /usr/include/boost/type_traits/has_minus.hpp \
 /usr/include/boost/type_traits/has_minus_assign.hpp \
 /usr/include/boost/iterator/advance.hpp \
 /usr/include/boost/lexical_cast/bad_lexical_cast.hpp \
 /usr/include/boost/lexical_cast/try_lexical_convert.hpp \
 /usr/include/boost/type_traits/type_identity.hpp \
 /usr/include/boost/lexical_cast/detail/is_character.hpp \
 /usr/include/boost/lexical_cast/detail/converter_numeric.hpp \
 /usr/include/boost/type_traits/is_base_of.hpp \
 /usr/include/boost/type_traits/is_float.hpp \
 /usr/include/boost/numeric/conversion/cast.hpp \
 /usr/include/boost/type.hpp \
 /usr/include/boost/numeric/conversion/converter.hpp \
 /usr/include/boost/numeric/conversion/conversion_traits.hpp \
 /usr/include/boost/numeric/conversion/detail/conversion_traits.hpp \
 /usr/include/boost/numeric/conversion/detail/meta.hpp \
 /usr/include/boost/numeric/conversion/detail/int_float_mixture.hpp \
 /usr/include/boost/numeric/conversion/int_float_mixture_enum.hpp \
 /usr/include/boost/numeric/conversion/detail/sign_mixture.hpp \
 /usr/include/boost/numeric/conversion/sign_mixture_enum.hpp \
 /usr/include/boost/numeric/conversion/detail/udt_builtin_mixture.hpp \
 /usr/include/boost/numeric/conversion/udt_builtin_mixture_enum.hpp \
 /usr/include/boost/numeric/conversion/detail/is_subranged.hpp \
 /usr/include/boost/mpl/multiplies.hpp /usr/include/boost/mpl/times.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/times.hpp \
 /usr/include/boost/numeric/conversion/converter_policies.hpp \
 /usr/include/c++/12/functional /usr/include/c++/12/tuple \
 /usr/include/c++/12/bits/uses_allocator.h \
 /usr/include/c++/12/bits/std_function.h \
 /usr/include/c++/12/unordered_map \
 /usr/include/c++/12/ext/aligned_buffer.h \
 /usr/include/c++/12/bits/hashtable.h \
 /usr/include/c++/12/bits/hashtable_policy.h \
 /usr/include/c++/12/bits/enable_special_members.h \
 /usr/include/c++/12/bits/node_handle.h \
 /usr/include/c++/12/bits/unordered_map.h \
 /usr/include/c++/12/bits/erase_if.h /usr/include/c++/12/array \
 /usr/include/boost/numeric/conversion/detail/converter.hpp \
 /usr/include/boost/numeric/conversion/bounds.hpp \
 /usr/include/boost/numeric/conversion/detail/bounds.hpp \
 /usr/include/boost/numeric/conversion/numeric_cast_traits.hpp \
 /usr/include/boost/numeric/conversion/detail/numeric_cast_traits.hpp \
 /usr/include/boost/numeric/conversion/detail/preprocessed/numeric_cast_traits_common.hpp \
 /usr/include/boost/numeric/conversion/detail/preprocessed/numeric_cast_traits_long_long.hpp \
 /usr/include/boost/lexical_cast/detail/converter_lexical.hpp \
 /usr/include/boost/type_traits/has_left_shift.hpp \
 /usr/include/boost/type_traits/has_right_shift.hpp \
 /usr/include/boost/detail/lcast_precision.hpp \
 /usr/include/boost/integer_traits.hpp \
 /usr/include/boost/lexical_cast/detail/widest_char.hpp \
 /usr/include/boost/array.hpp /usr/include/boost/swap.hpp \
 /usr/include/boost/core/swap.hpp \
 /usr/include/boost/container/container_fwd.hpp \
 /usr/include/boost/container/detail/std_fwd.hpp \
 /usr/include/boost/move/detail/std_ns_begin.hpp \
 /usr/include/boost/move/detail/std_ns_end.hpp \
 /usr/include/boost/lexical_cast/detail/converter_lexical_streams.hpp \
 /usr/include/boost/lexical_cast/detail/lcast_char_constants.hpp \
 /usr/include/boost/lexical_cast/detail/lcast_unsigned_converters.hpp \
 /usr/include/boost/noncopyable.hpp \
 /usr/include/boost/lexical_cast/detail/inf_nan.hpp \
 /usr/include/boost/math/special_functions/sign.hpp \
 /usr/include/boost/math/special_functions/detail/fp_traits.hpp \
 /usr/include/boost/predef/other/endian.h \
 /usr/include/boost/predef/library/c/gnu.h \
 /usr/include/boost/predef/library/c/_prefix.h \
 /usr/include/boost/predef/detail/_cassert.h /usr/include/c++/12/cassert \
 /usr/include/boost/predef/os/macos.h /usr/include/boost/predef/os/ios.h \
 /usr/include/boost/predef/os/bsd.h \
 /usr/include/boost/predef/os/bsd/bsdi.h \
 /usr/include/boost/predef/os/bsd/dragonfly.h \
 /usr/include/boost/predef/os/bsd/free.h \
 /usr/include/boost/predef/os/bsd/open.h \
 /usr/include/boost/predef/os/bsd/net.h \
 /usr/include/boost/predef/platform/android.h \
 /usr/include/boost/math/special_functions/fpclassify.hpp \
 /usr/include/boost/math/tools/real_cast.hpp \
 /usr/include/boost/integer.hpp /usr/include/boost/integer_fwd.hpp \
 /usr/include/boost/detail/basic_pointerbuf.hpp \
 /usr/include/boost/utility/declval.hpp \
 /usr/include/boost/math/constants/calculate_constants.hpp \
 /usr/include/boost/math/special_functions/trunc.hpp \
 /usr/include/boost/math/special_functions/log1p.hpp \
 /usr/include/boost/math/tools/rational.hpp \
 /usr/include/boost/math/tools/detail/polynomial_horner3_20.hpp \
 /usr/include/boost/math/tools/detail/rational_horner3_20.hpp \
 /usr/include/boost/math/tools/big_constant.hpp \
 /usr/include/boost/math/special_functions/powm1.hpp \
 /usr/include/boost/math/special_functions/expm1.hpp \
 /usr/include/boost/math/special_functions/sqrt1pm1.hpp \
 /usr/include/boost/math/special_functions/lanczos.hpp \
 /usr/include/boost/math/special_functions/detail/lanczos_sse2.hpp \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/emmintrin.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/xmmintrin.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/mmintrin.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/mm_malloc.h \
 /usr/include/boost/math/special_functions/detail/igamma_large.hpp \
 /usr/include/boost/math/special_functions/detail/unchecked_factorial.hpp \
 /usr/include/boost/math/special_functions/detail/lgamma_small.hpp \
 /usr/include/boost/math/special_functions/bernoulli.hpp \
 /usr/include/boost/math/special_functions/detail/unchecked_bernoulli.hpp \
 /usr/include/boost/math/special_functions/detail/bernoulli_details.hpp \
 /usr/include/boost/detail/lightweight_mutex.hpp \
 /usr/include/boost/smart_ptr/detail/lightweight_mutex.hpp \
 /usr/include/boost/smart_ptr/detail/lwm_std_mutex.hpp \
 /usr/include/c++/12/mutex /usr/include/c++/12/bits/chrono.h \
 /usr/include/c++/12/ratio /usr/include/c++/12/bits/parse_numbers.h \
 /usr/include/c++/12/bits/std_mutex.h \
 /usr/include/c++/12/bits/unique_lock.h \
 /usr/include/boost/math/tools/atomic.hpp /usr/include/c++/12/atomic \
 /usr/include/c++/12/bits/atomic_base.h \
 /usr/include/c++/12/bits/atomic_lockfree_defines.h \
 /usr/include/c++/12/bits/atomic_wait.h /usr/include/syscall.h \
 /usr/include/x86_64-linux-gnu/sys/syscall.h \
 /usr/include/x86_64-linux-gnu/asm/unistd.h \
 /usr/include/x86_64-linux-gnu/asm/unistd_64.h \
 /usr/include/x86_64-linux-gnu/bits/syscall.h \
 /usr/include/boost/math/tools/toms748_solve.hpp \
 /usr/include/boost/math/special_functions/polygamma.hpp \
 /usr/include/boost/math/special_functions/factorials.hpp \
 /usr/include/boost/math/special_functions/detail/polygamma.hpp \
 /usr/include/boost/math/special_functions/zeta.hpp \
 /usr/include/boost/math/special_functions/sin_pi.hpp \
 /usr/include/boost/math/special_functions/digamma.hpp \
 /usr/include/boost/math/special_functions/cos_pi.hpp \
 /usr/include/boost/math/special_functions/pow.hpp \
 /usr/include/boost/math/special_functions/trigamma.hpp \
 /usr/include/boost/math/special_functions/detail/igamma_inverse.hpp \
 /usr/include/boost/math/tools/tuple.hpp \
 /usr/include/boost/math/tools/roots.hpp /usr/include/c++/12/iostream \
 /usr/include/boost/math/special_functions/next.hpp \
 /usr/include/boost/math/special_functions/detail/gamma_inva.hpp \
 /usr/include/boost/math/special_functions/erf.hpp \
 /usr/include/boost/math/special_functions/detail/erf_inv.hpp \
 /usr/include/boost/math/special_functions/binomial.hpp \
 /usr/include/boost/math/special_functions/detail/ibeta_inverse.hpp \
 /usr/include/boost/math/special_functions/detail/t_distribution_inv.hpp \
 /usr/include/boost/math/special_functions/cbrt.hpp \
 /usr/include/boost/mpl/divides.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/divides.hpp \
 /usr/include/boost/math/special_functions/round.hpp \
 /usr/include/boost/math/special_functions/detail/ibeta_inv_ab.hpp
